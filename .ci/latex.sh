#!/usr/bin/env bash
# The LaTeX appendix of the sample derivation (`recoup run --latex`)
# compiled by pdflatex: fails on a TeX error or an overfull box wider than
# 10 pt. Needs Debian's texlive-latex-base and texlive-latex-recommended.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --bin recoup
mkdir -p target/latex
target/release/recoup run samples/toy-appendix.rcp --latex > target/latex/appendix.tex
(cd target/latex && pdflatex -interaction=nonstopmode -halt-on-error appendix.tex > appendix.log 2>&1) || {
  echo "pdflatex failed on the appendix:" >&2
  grep -A5 '^!' target/latex/appendix.log >&2 || tail -20 target/latex/appendix.log >&2
  exit 1
}
worst=$(grep -oE 'Overfull \\hbox \(([0-9.]+)pt too wide' target/latex/appendix.log | grep -oE '[0-9.]+' | sort -n | tail -1 || true)
if [ -n "$worst" ] && awk -v w="$worst" 'BEGIN { exit !(w > 10) }'; then
  echo "the appendix has an overfull box ${worst}pt wide (limit 10pt)" >&2
  exit 1
fi
echo "LaTeX appendix: compiled, widest overfull box ${worst:-none}"
