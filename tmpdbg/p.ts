import { parseNumberAt } from "../lib/io/recording_stream.ts";
import { readFileSync } from "node:fs";
const t0 = performance.now();
const text = new TextDecoder().decode(readFileSync("/tmp/bench2.csv"));
const t1 = performance.now();
let commas = 0;
for (let i = text.indexOf(","); i >= 0; i = text.indexOf(",", i + 1)) commas++;
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
    s += parseNumberAt(text, f, stop);
    count++;
    if (stop === end) break;
    f = stop + 1;
  }
  pos = end + 1;
}
const t3 = performance.now();
console.log(
  "decode",
  (t1 - t0).toFixed(0),
  "indexOf commas",
  (t2 - t1).toFixed(0),
  "parse",
  (t3 - t2).toFixed(0),
  count,
);
