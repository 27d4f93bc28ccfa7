import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { ModelInputError } from '../../src/model';

const root = path.resolve(__dirname, '../..');

/** What a model call refuses, as the CLI prints it (`field: rule`), or 'no error'; other errors propagate. */
export function ruleOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelInputError) return `${e.field}: ${e.rule}`;
    throw e;
  }
  return 'no error';
}

/** Run the model's command line on one JSON input (or raw text): exit code, stdout, stderr. */
export function cli(command: string, input: unknown) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'src/cli/model-cli.ts', command], {
    cwd: root,
    input: typeof input === 'string' ? input : JSON.stringify(input),
    encoding: 'utf8',
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
