import { readBin } from '/work/main/src/cli/bench/synth';
import { newtonLogistic } from '/work/main/src/engine/newton';
const n = +(process.env.N ?? 100000), p = 50, q = 51;
const X = new Float64Array(n * q); X.fill(1, 0, n);
readBin(`/work/main/bench-out/synth-n${n}-p50-s20261202.x.f64`, X.subarray(n));
const y = new Float64Array(n); readBin(`/work/main/bench-out/synth-n${n}-p50-s20261202.y.f64`, y);
const res = newtonLogistic({ X, n, p: q, y }, { tol: 1e-10, recordPath: true });
let prev = new Float64Array(q);
for (const b of res.path!) { let m = 0; for (let j = 0; j < q; j++) m = Math.max(m, Math.abs(b[j] - prev[j]) / (1 + Math.abs(prev[j]))); console.log(m.toExponential(2)); prev = b; }
