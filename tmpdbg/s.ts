import { openRecordingStream } from "../lib/io/recording_stream.ts";
const t0 = performance.now();
const s = await openRecordingStream("/tmp/bench2.csv");
const t1 = performance.now();
let n = 0;
await s.read([0, 1], (c) => {
  n += c[0].length;
});
const t2 = performance.now();
console.log(s.rate, s.length, n, "open", (t1 - t0).toFixed(0), "read", (t2 - t1).toFixed(0));
