/** Runs the command line in-process and captures what it prints (shared by the CLI tests). */
import { runCli } from '../../../src-main/cli/main';

export async function run(...argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await runCli(argv, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t) });
  return { code, stdout, stderr };
}
