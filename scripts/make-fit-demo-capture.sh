#!/bin/sh
# Makes the synthetic capture of the stored fit demo (cases/fit_bench_inverter_link.csv) with linkrise itself:
# the case runs with its "true" values (--set), on a 100 us grid from dense output; awk then shifts the time by
# the trigger offset (capture time = case time - offset), adds Gaussian noise (Box-Muller, fixed seed) and writes
# it the way an oscilloscope export looks: metadata lines, then `TIME [s],CH1 [V],CH2 [mA]`.
# Run from the repository root after building: scripts/make-fit-demo-capture.sh
set -eu
case_file=cases/fit_bench_inverter_link.yaml
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
build/linkrise run "$case_file" -q -o "$out" --sample 100us \
  --set link.capacitance=905uF --set r_pre.resistance=35.6Ohm
awk -F, -v offset=0.00035 -v volts=0.8 -v amperes=0.030 '
  function gauss() { return sqrt(-2 * log(1 - rand())) * cos(6.283185307179586 * rand()) }
  BEGIN { srand(20261202); OFS = "," }
  NR == 1 {
    for (i = 1; i <= NF; ++i) { if ($i == "link_plus [V]") v = i; if ($i == "r_pre.current [A]") c = i }
    print "Instrument,invented bench scope (synthetic capture made by linkrise)"
    print "Channels,CH1 link voltage; CH2 current probe"
    print "Record length,2000"
    print ""
    print "TIME [s],CH1 [V],CH2 [mA]"
    next
  }
  NR > 1 && NR <= 2001 {
    printf "%.6e,%.4f,%.1f\n", $1 - offset, $v + volts * gauss(), 1000 * ($c + amperes * gauss())
  }' "$out/waveforms.csv" > cases/fit_bench_inverter_link.csv
echo "wrote cases/fit_bench_inverter_link.csv"
