#include "io/hdf5/scan_writer.h"

#include <vector>

#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/result_writer.h"
#include "io/hdf5/schema.h"
#include "io/output_file.h"
#include "io/version.h"

namespace lobecast {
namespace {

// Row-major (S, N) copy of an Eigen (column-major) matrix.
std::vector<Complex> RowMajor(const Eigen::MatrixXcd& m) {
  std::vector<Complex> out(static_cast<std::size_t>(m.size()));
  for (Eigen::Index r = 0; r < m.rows(); ++r)
    for (Eigen::Index c = 0; c < m.cols(); ++c)
      out[static_cast<std::size_t>(r * m.cols() + c)] = m(r, c);
  return out;
}

}  // namespace

void WriteScanFile(const std::string& path, const ScanImpedanceTable& t, const ScanFileInfo& info) {
  OutputFile out(path, "the scan file");
  hdf5::ErrorSilencer silencer;
  try {
    {
      out.CreatedByLibrary();
      hdf5::Handle file = hdf5::CreateFile(out.temporary());
      const auto s = static_cast<hsize_t>(t.theta_rad.size());
      const auto n = static_cast<hsize_t>(t.reflection.cols());
      hdf5::Handle g = hdf5::CreateGroup(file, "/scan");
      hdf5::WriteScalarAttribute(g, "frequency_hz", info.frequency_hz);
      hdf5::WriteStringAttribute(g, "name", info.name);
      hdf5::WriteStringAttribute(g, "reference", info.reference);
      std::vector<double> theta, phi;
      for (std::size_t i = 0; i < t.theta_rad.size(); ++i) {
        theta.push_back(t.theta_rad[i] / kDegree);
        phi.push_back(t.phi_rad[i] / kDegree);
      }
      hdf5::WriteDataset(g, "theta_deg", {s}, theta.data(), "deg");
      hdf5::WriteDataset(g, "phi_deg", {s}, phi.data(), "deg");
      hdf5::WriteDataset(g, "active_impedance_ohm", {s, n}, RowMajor(t.active_impedance_ohm).data(),
                         "ohm");
      hdf5::WriteDataset(g, "reflection", {s, n}, RowMajor(t.reflection).data(), "1");
      hdf5::WriteDataset(g, "accepted_w", {s}, t.accepted_w.data(), "W");
      // The format attributes last: a stray temporary is never taken for a result.
      // The root attributes of the result file's schema, with the scan's format.
      using schema::S;
      hdf5::WriteStringAttribute(file, S(schema::kSoftwareVersionAttribute), SoftwareVersion());
      hdf5::WriteStringAttribute(file, S(schema::kTimeConventionAttribute),
                                 schema::kTimeConvention);
      hdf5::WriteStringAttribute(file, S(schema::kCreatedAttribute), Iso8601UtcNow());
      hdf5::WriteStringAttribute(file, S(schema::kInputAttribute), info.input_text);
      hdf5::WriteStringAttribute(file, S(schema::kFormatAttribute), kScanFormat);
      hdf5::WriteIntAttribute(file, S(schema::kFormatVersionAttribute), 1);
      g.Reset();
      // Closing flushes: a full disk shows here, and the file is closed either way.
      if (file.Close() < 0) hdf5::Fail(path, "closing the scan file");
    }
    out.Commit();
  } catch (const IoError& e) {
    out.Abandon();
    if (e.path() == path) throw;
    throw IoError(path, e.detail());  // the target's name, never the temporary's
  }
}

}  // namespace lobecast
