#!/usr/bin/env bash
# The C interface from C (cc) and Fortran (gfortran, iso_c_binding): build
# the static library and the programs, run them, and compare every value
# they print with recoup's own evaluation of the same expression (floats to
# 1e-13 relative, the accuracy the families promise, or 1e-300 absolute;
# exact values as text).
set -euo pipefail
cd "$(dirname "$0")/../.."
cargo build --release -p recoup-capi
cargo build --release --bin recoup
lib=target/release/librecoup_capi.a
cc -O2 -Wall -Werror -Icapi/include capi/tests/c/check.c "$lib" -lm -lpthread -ldl -o target/capi-check-c
gfortran -O2 -Wall capi/tests/fortran/check.f90 "$lib" -lm -lpthread -ldl -o target/capi-check-f
target/release/recoup tabulate 3j --max-j 6 -o target/capi-table.r3j > /dev/null
target/release/recoup tabulate 6j --max-j 6 -o target/capi-table.r6j > /dev/null
checked=0
for prog in target/capi-check-c target/capi-check-f; do
  "$prog" target/capi-table.r3j target/capi-table.r6j > target/capi-out.txt
  while IFS=$'\t' read -r kind expr value; do
    case "$kind" in
      float)
        rust=$(target/release/recoup eval --float "$expr")
        if ! awk -v a="$value" -v b="$rust" 'BEGIN { d = a - b; if (d < 0) d = -d; m = b < 0 ? -b : b; exit !(d <= 1e-13 * m || d <= 1e-300) }'; then
          echo "$prog: $expr gave $value, recoup gives $rust" >&2
          exit 1
        fi ;;
      exact)
        rust=$(target/release/recoup eval "$expr" | cut -f1)
        if [ "$rust" != "$value" ]; then
          echo "$prog: $expr gave $value, recoup gives $rust" >&2
          exit 1
        fi ;;
      *) echo "$prog: unexpected line: $kind $expr $value" >&2; exit 1 ;;
    esac
    checked=$((checked + 1))
  done < target/capi-out.txt
done
echo "C and Fortran interface: $checked values agree with recoup"
