// Evaluated as the body of a function, in Node and in a Chromium page alike: it
// must stay plain JavaScript with no imports and no outer names. It evaluates
// every floating-point library function the checks call, and the number
// formatting the result document relies on, on fixed edge values and on
// pseudo-random arguments, and returns each result as the exact bits of its
// double (16 hex digits) or as the string produced. Two engines that return
// equal lists compute those functions identically on these arguments.
const state = { s: 0x9e3779b9 | 0 };
// xorshift32 (Marsaglia, J. Stat. Softw. 8(14), 2003): a fixed stream of arguments.
function next32() {
  let x = state.s;
  x ^= x << 13;
  x ^= x >>> 17;
  x ^= x << 5;
  state.s = x;
  return x >>> 0;
}
function uniform() {
  return (next32() * 4294967296 + next32()) / 18446744073709551616;
}
const view = new DataView(new ArrayBuffer(8));
function bits(x) {
  // NaN payloads carry no number and differ between engines: every NaN reads alike.
  if (x !== x) return "nan";
  view.setFloat64(0, x);
  return view.getUint32(0).toString(16).padStart(8, "0") + view.getUint32(4).toString(16).padStart(8, "0");
}
const EDGES = [0, -0, 1, -1, 0.5, 2, 1e-300, 5e-324, 1.7976931348623157e308, Infinity, -Infinity, NaN, Math.PI, Math.E, 709.782712893384, -745.1332191019411, 1e-16, 1 - 2 ** -53, 1 + 2 ** -52];
function args(scale, n) {
  const out = EDGES.slice();
  for (let i = 0; i < n; i++) out.push((uniform() * 2 - 1) * scale);
  // Doubles over the whole exponent range, built from their bits so that no
  // library function (which might differ) enters the arguments themselves.
  for (let i = 0; i < n; i++) {
    view.setUint32(0, ((next32() & 0x80000000) | (((next32() % 2000) + 24) << 20) | (next32() & 0xfffff)) >>> 0);
    view.setUint32(4, next32());
    out.push(view.getFloat64(0));
  }
  return out;
}
const N = 400;
const unary = {
  exp: [Math.exp, 50],
  expm1: [Math.expm1, 5],
  log: [Math.log, 1e6],
  log1p: [Math.log1p, 2],
  log10: [Math.log10, 1e6],
  log2: [Math.log2, 1e6],
  sqrt: [Math.sqrt, 1e6],
  cbrt: [Math.cbrt, 1e6],
  sin: [Math.sin, 100],
  cos: [Math.cos, 100],
  tan: [Math.tan, 10],
  atan: [Math.atan, 100],
  asin: [Math.asin, 1],
  acos: [Math.acos, 1],
  sinh: [Math.sinh, 20],
  cosh: [Math.cosh, 20],
  tanh: [Math.tanh, 20],
  atanh: [Math.atanh, 1],
};
const results = {};
for (const [name, [f, scale]] of Object.entries(unary)) results[name] = args(scale, N).map((x) => bits(f(x)));
const pairs = [];
for (const x of args(10, N / 4)) pairs.push([x, (uniform() * 2 - 1) * 20]);
for (let i = 0; i < N; i++) pairs.push([uniform() * 4, (uniform() * 2 - 1) * 300]);
results.pow = pairs.map(([x, y]) => bits(Math.pow(x, y)));
results.powOperator = pairs.map(([x, y]) => bits(x ** y));
results.atan2 = pairs.map(([x, y]) => bits(Math.atan2(y, x)));
results.hypot = pairs.map(([x, y]) => bits(Math.hypot(x, y)));
results.hypot3 = pairs.map(([x, y]) => bits(Math.hypot(x, y, x - y)));
const printed = args(1e3, N);
results.toString = printed.map((x) => String(x));
results.toPrecision17 = printed.map((x) => x.toPrecision(17));
results.toExponential6 = printed.map((x) => x.toExponential(6));
results.toFixed6 = printed.filter((x) => Math.abs(x) < 1e21).map((x) => x.toFixed(6));
results.parse = printed.map((x) => bits(Number(x.toPrecision(12))));
results.jsonNumbers = [JSON.stringify(printed.filter(Number.isFinite))];
const sorted = printed.filter((x) => !Number.isNaN(x)).slice();
sorted.sort((a, b) => a - b);
results.sort = sorted.map(bits);
return results;
