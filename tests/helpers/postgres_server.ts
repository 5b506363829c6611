/**
 * A throw-away PostgreSQL server for tests: initdb in a temporary folder,
 * the server on a free loopback port, stopped by the PID it was started with
 * (and its own data folder); nothing else is touched. PostgreSQL refuses to
 * run as root, so as root it runs as the `postgres` user Debian's packages
 * create (runuser), in a folder handed to that user. .ci/run installs
 * Debian's postgresql; without its binaries the tests say so and skip.
 */
import { type ChildProcess, spawn, spawnSync } from "node:child_process";
import { existsSync, readdirSync } from "node:fs";
import { chown, mkdtemp, rm } from "node:fs/promises";
import { createServer } from "node:net";
import process from "node:process";

/** Debian's PostgreSQL binaries: the newest major version installed (15 on bookworm). */
export const POSTGRES_BIN = (() => {
  let versions: number[] = [];
  try {
    versions = readdirSync("/usr/lib/postgresql").map(Number).filter(Number.isInteger);
  } catch {
    // not installed: postgresMissing says so
  }
  versions.sort((a, b) => b - a);
  const found = versions.find((v) => existsSync(`/usr/lib/postgresql/${v}/bin/postgres`));
  return `/usr/lib/postgresql/${found ?? 15}/bin`;
})();
const BINARIES = ["initdb", "postgres", "pg_ctl"].map((b) => `${POSTGRES_BIN}/${b}`);

/** Why the PostgreSQL tests cannot run here, or undefined when they can. */
export function postgresMissing(): string | undefined {
  const absent = BINARIES.filter((b) => !existsSync(b));
  return absent.length === 0
    ? undefined
    : `PostgreSQL binaries absent (${absent.join(", ")}): apt-get install -y postgresql`;
}

/** Bounded waits: far above what a loaded 2-core machine needs; only a hang reaches them. */
const START_MS = 120_000;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function freePort(): Promise<number> {
  return await new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      const port = typeof address === "object" && address !== null ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

/** A running test server. */
export interface TestPostgres {
  /** postgres://quiver@127.0.0.1:PORT/postgres */
  readonly url: string;
  /** Stops the server this started, by its PID, and removes its folder. */
  stop(): Promise<void>;
}

/** Starts a server; throws saying why when it does not come up. */
export async function startPostgres(): Promise<TestPostgres> {
  const asRoot = process.getuid?.() === 0;
  const folder = await mkdtemp("/tmp/quiver-pg-");
  // As root, everything runs as the postgres user, which must own the folder.
  let wrap = (command: string, args: string[]): [string, string[]] => [command, args];
  if (asRoot) {
    const uid = spawnSync("id", ["-u", "postgres"], { encoding: "utf8" });
    const gid = spawnSync("id", ["-g", "postgres"], { encoding: "utf8" });
    if (uid.status !== 0 || gid.status !== 0) {
      throw new Error("running as root and there is no postgres user to run the server as");
    }
    await chown(folder, Number(uid.stdout.trim()), Number(gid.stdout.trim()));
    wrap = (command, args) => ["runuser", ["-u", "postgres", "--", command, ...args]];
  }
  const data = `${folder}/data`;
  const [initCommand, initArgs] = wrap(`${POSTGRES_BIN}/initdb`, [
    "-D",
    data,
    "-U",
    "quiver",
    "--auth=trust",
    "-E",
    "UTF8",
    "--no-instructions",
  ]);
  const init = spawnSync(initCommand, initArgs, { encoding: "utf8", timeout: START_MS });
  if (init.status !== 0) {
    await rm(folder, { recursive: true, force: true });
    throw new Error(`initdb failed: ${init.stderr || init.error?.message}`);
  }
  const port = await freePort();
  const [command, args] = wrap(`${POSTGRES_BIN}/postgres`, [
    "-D",
    data,
    "-p",
    String(port),
    "-c",
    "listen_addresses=127.0.0.1",
    "-c",
    `unix_socket_directories=${folder}`,
    "-c",
    "fsync=off",
  ]);
  let log = "";
  const child: ChildProcess = spawn(command, args, { stdio: ["ignore", "ignore", "pipe"] });
  child.stderr?.on("data", (chunk) => (log += String(chunk)));
  const stop = async () => {
    // The server's own PID (runuser's child when run as root), from the file it writes.
    const [pgCommand, pgArgs] = wrap(`${POSTGRES_BIN}/pg_ctl`, [
      "stop",
      "-D",
      data,
      "-m",
      "fast",
      "-w",
      "-t",
      "60",
    ]);
    if (existsSync(`${data}/postmaster.pid`)) {
      spawnSync(pgCommand, pgArgs, { encoding: "utf8", timeout: 90_000 });
    }
    if (child.pid !== undefined && child.exitCode === null && child.signalCode === null) {
      child.kill("SIGTERM");
      await Promise.race([new Promise((r) => child.once("exit", r)), sleep(15_000)]);
      if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
    }
    await rm(folder, { recursive: true, force: true });
  };
  const end = Date.now() + START_MS;
  for (;;) {
    if (log.includes("ready to accept connections")) break;
    if (child.exitCode !== null || Date.now() > end) {
      await stop();
      throw new Error(`the test PostgreSQL server did not start: ${log}`);
    }
    await sleep(200);
  }
  return { url: `postgres://quiver@127.0.0.1:${port}/postgres`, stop };
}
