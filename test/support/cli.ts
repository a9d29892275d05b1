import { vi } from 'vitest';
import { main } from '@stemwise/cli';

/** main() in this process (what bin/stemwise.mjs runs), its stdout and stderr captured: quicker than a process. */
export async function runMain(args: string[], env: Record<string, string | undefined>): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => ((stdout += String(chunk)), true));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => ((stderr += String(chunk)), true));
  try {
    return { code: await main(args, env), stdout, stderr };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}
