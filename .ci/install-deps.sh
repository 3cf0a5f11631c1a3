#!/usr/bin/env bash
# Install the Debian packages lobecast needs to build and test.
# Idempotent: does nothing when everything is already present.
set -euo pipefail

packages=(
  build-essential cmake pkg-config
  libeigen3-dev libfftw3-dev libhdf5-dev libgtest-dev libgmock-dev
  libtomlplusplus-dev libcli11-dev libcairo2-dev
  coinor-libclp-dev
  python3-numpy python3-scipy python3-h5py python3-cvxopt hdf5-tools clang-format
  # The fuzz targets (.ci/run): clang, its libFuzzer and sanitizer runtimes
  # (libclang_rt.fuzzer*.a: libclang-rt-14-dev, pulled by libclang-rt-dev), OpenMP
  # for clang (libomp-dev) and llvm-symbolizer for readable sanitizer stacks (llvm).
  clang libclang-rt-dev libomp-dev llvm
)
# Scale-out with MPI (-DLOBECAST_MPI=ON, .ci/run's MPI stage), only when asked:
# LOBECAST_WITH_MPI=1 bash .ci/install-deps.sh (or the argument --mpi). OpenMPI from
# Debian; the HDF5 stays the serial libhdf5-dev (rank 0 writes, cli/mpi/scale_out.h).
if [ "${LOBECAST_WITH_MPI:-0}" = 1 ] || [ "${1:-}" = "--mpi" ]; then
  packages+=(libopenmpi-dev openmpi-bin)
fi

missing=()
for p in "${packages[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$p")
  fi
done

if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi

echo "lobecast: installing missing packages: ${missing[*]}" >&2
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
