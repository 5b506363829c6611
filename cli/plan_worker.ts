/**
 * A worker of the campaign pool: runs one plan step's command per message
 * and answers `{ ok: true }` or `{ ok: false, error }`.
 *
 * @module
 */
import { planCommandTable } from "./plan_commands.ts";
import { withStderrLabel } from "./terminal.ts";

/** A step to run. */
export interface StepMessage {
  readonly command: string;
  readonly argv: string[];
  /** Put before every line the step writes to stderr. */
  readonly label: string;
}

const scope = self as unknown as {
  onmessage: ((event: MessageEvent<StepMessage>) => void) | null;
  postMessage(message: unknown): void;
};

// The handler is set at once and waits for the table itself: a message that came while the
// module still awaited its commands (loaded at run time, lib/lazy_import.ts) would be lost.
const commands = planCommandTable();

scope.onmessage = async (event) => {
  const { command, argv, label } = event.data;
  try {
    const table = await commands;
    await withStderrLabel(label, () => table[command].run(argv));
    scope.postMessage({ ok: true });
  } catch (error) {
    scope.postMessage({ ok: false, error: error instanceof Error ? error.message : String(error) });
  }
};
