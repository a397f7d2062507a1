# study_lib.sh - what the study tests share: a small tolerance study of the
# demo model, written into the scratch folder. Source it after lib.sh.

# small_study MODEL: writes small.study, 250 samples of the demo model
# (tolerances and limits invented for the tests, wider than the demo's so
# that some samples leave the limits), its outputs with and without
# limits, one of them (reach) the same in every sample.
small_study() {
  cat >small.study <<STUDY
kinloop-study 1
model "$1"
seed 7
samples 250
vary joint crank_pin a x tolerance 0.3 normal
vary joint rocker_pin b x tolerance 0.3 normal
vary joint pivot b y tolerance 0.3 uniform
vary point "tucker tip" y tolerance 0.5 normal
output stroke swing slide rail
output mu_min min transmission rocker_pin crank_pin pivot
output tip_low at 270 y "tucker tip"
output reach reach
limit stroke 213.2 214.2
limit mu_min 51.5 180
STUDY
}

# without_timing FILE: FILE but for its throughput line
without_timing() {
  grep -v '^throughput' "$1"
}
