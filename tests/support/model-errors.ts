import { ModelInputError } from '../../src/model';

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
