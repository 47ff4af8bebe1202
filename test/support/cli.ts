/** Drives the real command line in-process, capturing what it writes. */
import { vi } from 'vitest';
import { main } from '../../src/cli/main.ts';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `singleshot ARGS…` through `main` with stdout and stderr captured. */
export async function runCli(args: readonly string[]): Promise<CliRun> {
  let stdout = '', stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => { stdout += String(s); return true; });
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => { stderr += String(s); return true; });
  try {
    return { code: await main(['node', 'singleshot', ...args]), stdout, stderr };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

/** The same, with the short field names some tests use. */
export async function runMain(args: readonly string[]): Promise<{ code: number; out: string; err: string }> {
  const r = await runCli(args);
  return { code: r.code, out: r.stdout, err: r.stderr };
}
