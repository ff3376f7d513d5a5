#!/usr/bin/env bash
# Every LaTeX output of the samples compiled by pdflatex as a complete
# document: the appendix of the sample derivation (`recoup run --latex`),
# the derivation chains of simplify and recouple (`--latex --steps
# --document`), results and expressions (`--latex --document`, `latex
# --document`), and the LaTeX snapshots of the test suite. Fails on a TeX
# error or an overfull box wider than 10 pt. Needs Debian's
# texlive-latex-base and texlive-latex-recommended.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --bin recoup
R=target/release/recoup
out=target/latex
rm -rf "$out" && mkdir -p "$out"
line() { sed -n "${2}p" "samples/$1"; }

$R run samples/toy-appendix.rcp --latex > "$out/appendix.tex"
$R simplify --latex --steps --document - < samples/toy-overlap.txt > "$out/overlap-steps.tex"
$R simplify --latex --document - < samples/toy-overlap.txt > "$out/overlap.tex"
$R simplify --latex --steps --document "$(line toy-claims.txt 3)" > "$out/claims-steps.tex"
$R simplify --latex --steps --document "$(line toy-quadrupolaron.txt 3)" > "$out/quadrupolaron-steps.tex"
$R simplify --latex --document "$(line toy-quadrupolaron.txt 4)" > "$out/quadrupolaron-hyperfine.tex"
$R recouple --latex --steps --document "$(line toy-schemes.txt 2)" "$(line toy-schemes.txt 3)" > "$out/schemes-steps.tex"
$R recouple --latex --document "$(line toy-schemes.txt 2)" "$(line toy-schemes.txt 3)" > "$out/schemes.tex"
$R recouple --latex --document --only-6j "((((a, b) p, c) q, d) r, e) J" "((((e, b) s, c) t, d) u, a) J" > "$out/five-leaves.tex"
$R latex --document - < samples/toy-overlap.txt > "$out/overlap-input.tex"
$R latex --as-written --document - < samples/toy-overlap.txt > "$out/overlap-as-written.tex"
# a Wigner-Eckart projection sum: the input as written on the first line,
# the result with the Clebsch-Gordan coefficient the way the input writes it
$R simplify --latex --steps --document "sum(m1, m2, m1p: <j1, m1; j2, m2 | j, m> <j1p, m1p; j2, m2 | jp, mp> <j1p, m1p; k, q | j1, m1>)" > "$out/wigner-eckart-steps.tex"
$R recouple --matrix --latex --document "((1/2, 1/2) a, 1) J" "(1/2, (1/2, 1) b) J" > "$out/matrix.tex"
# the LaTeX snapshots of the test suite (single-line `latex` outputs,
# which the user places in an environment of their own): compiled for TeX
# errors, each scaled to the line width (their breaking is what the
# --document outputs above check)
n=0
for snap in tests/snapshots/*latex*.snap; do
  [ -e "$snap" ] || continue
  n=$((n + 1))
  {
    echo '\documentclass{article}'
    echo '\usepackage{amsmath,amssymb,graphicx}'
    echo '\begin{document}'
    # the snapshot's body: after the front matter (between the second ---)
    body=$(awk 'f>=2 {print} /^---$/ {f++}' "$snap")
    if grep -qE '\\begin\{(align|multline|equation|gather)' <<< "$body"; then
      echo "$body"
    else
      printf '\\noindent\\resizebox{\\linewidth}{!}{$\\displaystyle %s$}\n' "$body"
    fi
    echo '\end{document}'
  } > "$out/snapshot-$n.tex"
done

status=0
for tex in "$out"/*.tex; do
  name=$(basename "$tex" .tex)
  if ! (cd "$out" && pdflatex -interaction=nonstopmode -halt-on-error "$name.tex" > "$name.out" 2>&1); then
    echo "pdflatex failed on $name:" >&2
    grep -A5 '^!' "$out/$name.log" >&2 || tail -20 "$out/$name.log" >&2
    status=1
    continue
  fi
  worst=$(grep -oE 'Overfull \\hbox \(([0-9.]+)pt too wide' "$out/$name.log" | grep -oE '[0-9.]+' | sort -n | tail -1 || true)
  if [ -n "$worst" ] && awk -v w="$worst" 'BEGIN { exit !(w > 10) }'; then
    echo "$name has an overfull box ${worst}pt wide (limit 10pt)" >&2
    status=1
  fi
  echo "LaTeX $name: compiled, widest overfull box ${worst:-none}"
done
exit $status
