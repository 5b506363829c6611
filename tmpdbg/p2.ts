import { readFileSync } from "node:fs";
const text = new TextDecoder().decode(readFileSync("/tmp/bench2.csv"));
function num(text: string, f: number, stop: number): number {
  let c = text.charCodeAt(f);
  let k = f;
  if (c === 43 || c === 45) c = text.charCodeAt(++k);
  if (!((c >= 48 && c <= 57) || c === 46) || stop === f) return NaN;
  if (c === 48) {
    const d = text.charCodeAt(k + 1) | 32;
    if (d === 120 || d === 98 || d === 111) return NaN;
  }
  const v = +text.slice(f, stop);
  return v - v === 0 ? v : NaN;
}
const t2 = performance.now();
let s = 0, count = 0;
let pos = text.indexOf("\n") + 1;
while (pos < text.length) {
  const nl = text.indexOf("\n", pos);
  const end = nl < 0 ? text.length : nl;
  let f = pos;
  for (;;) {
    const c = text.indexOf(",", f);
    const stop = c < 0 || c > end ? end : c;
    s += num(text, f, stop);
    count++;
    if (stop === end) break;
    f = stop + 1;
  }
  pos = end + 1;
}
const t3 = performance.now();
console.log("parse", (t3 - t2).toFixed(0), count, s);
