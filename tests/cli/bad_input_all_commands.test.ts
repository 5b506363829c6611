import { lstat, mkdir, mkdtemp, readdir, readFile, symlink, writeFile } from "node:fs/promises";
import { execFileSync } from "node:child_process";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { encodeWav } from "../../lib/io/wav.ts";

// The reader-level bad inputs, through every command that reads a recording
// (the spectrum command's own, fuller matrix is in spectrum.test.ts).
const FILES: Record<string, string> = {
  "empty.csv": "",
  "header_only.csv": "time_s,f [N],a [m/s^2]\n",
  "ragged.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1\n",
  "text.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,x,2\n",
  "nan.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1,NaN\n",
  "duplicate.csv": "time_s,f [N],f [N]\n0,1,2\n",
  "jump.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1,2\n0.002,1,2\n0.009,1,2\n0.010,1,2\n",
  "bom_crlf.csv": "\uFEFFtime_s,f [N],a [m/s^2]\r\n" +
    Array.from({ length: 4096 }, (_, i) => `${i / 1000},${Math.sin(i)},${Math.cos(i)}`).join(
      "\r\n",
    ) + "\r\n\r\n",
};
const CASES: [string, number, RegExp][] = [
  ["empty.csv", 1, /empty\.csv: the file is empty/],
  ["header_only.csv", 1, /header_only\.csv:1: .*no data rows/],
  ["ragged.csv", 1, /ragged\.csv:3: row has 2 fields/],
  ["text.csv", 1, /text\.csv:3:2: "x" is not a number/],
  ["nan.csv", 1, /nan\.csv:3:3: .*not a finite number/],
  ["duplicate.csv", 1, /duplicate\.csv:1:3: duplicate column name/],
  ["jump.csv", 1, /jump\.csv:5:1: .*gap, jump or jitter/],
];
const COMMANDS: Record<string, string[]> = {
  frf: ["--input", "f", "--outputs", "a"],
  hammer: ["--force", "f", "--outputs", "a"],
  bands: [],
  // Z weighting: A needs a rate above 24.4 kHz, a fault of the options the header reveals
  // before the data are read.
  level: ["--reference", "1", "--weighting", "Z"],
  orders: ["--tacho", "f", "--ppr", "1", "--channels", "a"],
  comfort: ["--weighting", "wk", "--channels", "a"],
  tones: ["--channels", "a"],
};

describe("every command refuses bad recordings the same way and writes nothing", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-bad-all-");
    for (const [name, content] of Object.entries(FILES)) await writeFile(`${dir}/${name}`, content);
  });
  for (const [command, args] of Object.entries(COMMANDS)) {
    for (const [file, code, pattern] of CASES) {
      test(`${command}: ${file}`, async () => {
        await writeFile(`${dir}/out.json`, "previous\n");
        const before = (await readdir(dir)).sort();
        const r = runQuiver([command, file, ...args, "--out", "out.json"], dir);
        expect(r.code).toBe(code);
        expect(r.stderr).toMatch(pattern);
        expect(r.stderr.trim().split("\n")).toHaveLength(1);
        expect(await readFile(`${dir}/out.json`, "utf8")).toBe("previous\n");
        expect((await readdir(dir)).sort()).toEqual(before);
      });
    }
  }
  test("a BOM, CRLF and trailing blank lines are read normally by frf", () => {
    const r = runQuiver(
      ["frf", "bom_crlf.csv", "--input", "f", "--outputs", "a", "--block", "512"],
      dir,
    );
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toMatch(/^frequency_hz,a_re/);
  });
});

/** A float WAV of two channels with one non-finite sample (past the first read chunk for NaN). */
function floatWavWith(channel: number, sample: number, value: number): Uint8Array {
  const n = 80_000;
  const channels = [0, 1].map((c) => ({
    name: `ch${c + 1}`,
    unit: "FS",
    data: new Float64Array(n).map((_, i) => 0.3 * Math.sin(i / (5 + c))),
  }));
  channels[channel].data[sample] = value;
  return encodeWav({ rate: 8000, startTime: 0, channels }, "float32");
}

describe("a float WAV holding NaN or ±Inf is refused by every command, naming channel and sample", () => {
  const WAV_COMMANDS: Record<string, string[]> = {
    spectrum: [],
    frf: ["--input", "ch1", "--outputs", "ch2"],
    hammer: ["--force", "ch1", "--outputs", "ch2"],
    // WAV channels are in FS, which has no standard level reference (a fault of the
    // options, found from the header before the data are read).
    bands: ["--reference", "1"],
    level: ["--reference", "1", "--weighting", "Z"],
    orders: ["--tacho", "ch1", "--ppr", "1", "--channels", "ch2"],
  };
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-bad-wav-");
    await writeFile(`${dir}/nan.wav`, floatWavWith(1, 70_000, NaN));
    await writeFile(`${dir}/inf.wav`, floatWavWith(0, 3, -Infinity));
  });
  for (const [command, args] of Object.entries(WAV_COMMANDS)) {
    for (
      const [file, pattern] of [
        ["nan.wav", /nan\.wav: channel ch2, sample 70000: NaN is not a finite number/],
        ["inf.wav", /inf\.wav: channel ch1, sample 3: -Infinity is not a finite number/],
      ] as const
    ) {
      test(`${command}: ${file}`, async () => {
        await writeFile(`${dir}/out.json`, "previous\n");
        const r = runQuiver([command, file, ...args, "--out", "out.json"], dir);
        expect(r.code).toBe(1);
        expect(r.stderr).toMatch(pattern);
        expect(await readFile(`${dir}/out.json`, "utf8")).toBe("previous\n");
      });
    }
  }
});

describe("an input that is not a regular file is refused at once by every command that reads a recording", () => {
  // The refusal comes from stat, before any open: a FIFO without a writer would block an
  // open for reading forever, and /dev/zero never ends. runQuiver's timeout turns a hang
  // into a failure.
  const READERS: Record<string, string[]> = {
    spectrum: [],
    spectrogram: [],
    frf: ["--input", "f", "--outputs", "a"],
    hammer: ["--force", "f", "--outputs", "a"],
    bands: [],
    level: ["--reference", "1", "--weighting", "Z"],
    orders: ["--tacho", "f", "--ppr", "1", "--channels", "a"],
    paths: ["--references", "f", "--transfer", "t.json", "--target", "a"],
    calibrate: ["--channel", "a"],
  };
  let dir: string;
  let device: string | undefined;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-not-file-");
    execFileSync("mkfifo", [`${dir}/pipe.csv`]);
    await mkdir(`${dir}/folder.csv`);
    try {
      // A character device of our own (1,5 is /dev/zero, Linux devices.txt); needs root.
      execFileSync("mknod", [`${dir}/zero.csv`, "c", "1", "5"], { stdio: "ignore" });
      device = "zero.csv";
    } catch {
      device = undefined; // the device case below falls back to /dev/zero itself
    }
    // paths reads its transfer FRF before the recording: a real one, from frf.
    const rows = Array.from({ length: 256 }, (_, i) => `${i / 100},${Math.sin(i)},${Math.cos(i)}`);
    await writeFile(`${dir}/fa.csv`, "time_s,f [N],a [m/s^2]\n" + rows.join("\n") + "\n");
    const frf = runQuiver(
      ["frf", "fa.csv", "--input", "f", "--outputs", "a", "--block", "64", "--out", "t.json"],
      dir,
    );
    if (frf.code !== 0) throw new Error(frf.stderr);
  }, 600_000);
  for (const [command, args] of Object.entries(READERS)) {
    test(
      `${command}: a FIFO, a folder and a device, each in one line, exit 2, nothing written`,
      async () => {
        const cases: [string, RegExp][] = [
          [
            "pipe.csv",
            /pipe\.csv: a recording must be a regular file; this is a FIFO \(named pipe\)$/,
          ],
          ["folder.csv", /folder\.csv: a recording must be a regular file; this is a folder$/],
          [
            device ?? "/dev/zero",
            /zero(\.csv)?: a recording must be a regular file; this is a character device$/,
          ],
        ];
        for (const [file, pattern] of cases) {
          const before = (await readdir(dir)).sort();
          const r = runQuiver([command, file, ...args, "--out", "out.json"], dir);
          expect(r.code, r.stderr).toBe(2);
          expect(r.stderr.trim(), file).toMatch(pattern);
          expect(r.stderr.trim().split("\n")).toHaveLength(1);
          expect((await readdir(dir)).sort()).toEqual(before);
        }
      },
      600_000,
    );
  }
  test("a set-up file that is a FIFO is refused the same way", async () => {
    await writeFile(
      `${dir}/r.csv`,
      "time_s,a [V]\n" + Array.from({ length: 64 }, (_, i) => `${i / 100},${i % 3}`).join("\n") +
        "\n",
    );
    const r = runQuiver(["spectrum", "r.csv", "--block", "16", "--setup", "pipe.csv"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      "quiver spectrum: pipe.csv: a channel set-up must be a regular file; this is a FIFO (named pipe)",
    );
  });
});

describe("--out replaces only a regular file; --out-dir must be a folder", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-out-kind-");
    await writeFile(
      `${dir}/r.csv`,
      "time_s,a [V]\n" + Array.from({ length: 64 }, (_, i) => `${i / 100},${i % 3}`).join("\n") +
        "\n",
    );
    execFileSync("mkfifo", [`${dir}/pipe.csv`]);
    await mkdir(`${dir}/folder.csv`);
    await writeFile(`${dir}/kept.csv`, "kept\n");
    await symlink(`${dir}/kept.csv`, `${dir}/link.csv`);
    await writeFile(`${dir}/plan.json`, "{}\n");
  });
  test(
    "a FIFO, a folder and a symbolic link are refused before any work, each in one line",
    async () => {
      const cases: [string, string][] = [
        ["pipe.csv", "--out pipe.csv is a FIFO (named pipe); quiver replaces only regular files"],
        ["folder.csv", "--out folder.csv is a folder; quiver replaces only regular files"],
        [
          "link.csv",
          "--out link.csv is a symbolic link; quiver does not write through links (name the link's target, or remove the link)",
        ],
      ];
      for (const [out, message] of cases) {
        const r = runQuiver(["spectrum", "r.csv", "--block", "16", "--out", out], dir);
        expect(r.code).toBe(2);
        expect(r.stderr.trim()).toBe(`quiver spectrum: ${message}`);
      }
      expect((await lstat(`${dir}/pipe.csv`)).isFIFO()).toBe(true);
      expect((await lstat(`${dir}/link.csv`)).isSymbolicLink()).toBe(true);
      expect(await readFile(`${dir}/kept.csv`, "utf8")).toBe("kept\n");
    },
    600_000,
  );
  test("a device node stays a device (the suite runs as root, where rename would replace it)", async (context) => {
    try {
      execFileSync("mknod", [`${dir}/null.csv`, "c", "1", "3"], { stdio: "ignore" });
    } catch {
      context.skip("mknod failed (not root, or no CAP_MKNOD): a device node cannot be made here");
    }
    const r = runQuiver(["spectrum", "r.csv", "--block", "16", "--out", "null.csv"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      "quiver spectrum: --out null.csv is a character device; quiver replaces only regular files",
    );
    expect((await lstat(`${dir}/null.csv`)).isCharacterDevice()).toBe(true);
  });
  test("run --out-dir naming a file is refused in one line", () => {
    const r = runQuiver(["run", "plan.json", "--out-dir", "r.csv"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe("quiver run: --out-dir r.csv is a regular file, not a folder");
  });
});
