/**
 * A command that finished normally but must exit with a code other than 0 (e.g. `rerun` on a
 * mismatch: 1). Thrown by the action after it has printed its result; `main` returns the code.
 */
export class ExitStatus extends Error {
  constructor(readonly code: number) {
    super(`exit ${code}`);
    this.name = 'ExitStatus';
  }
}
