/** Input that breaks a rule of the engine: `field` is a path such as `enzyme.kdRefPerH`, `rule` a phrase. */
export class ModelInputError extends Error {
  readonly field: string;
  readonly rule: string;
  constructor(field: string, rule: string) {
    super(`${field}: ${rule}`);
    this.name = 'ModelInputError';
    this.field = field;
    this.rule = rule;
  }
}

/** Raised when a chunked computation is cancelled by its caller. */
export class ModelCancelledError extends Error {
  constructor() {
    super('computation cancelled');
    this.name = 'ModelCancelledError';
  }
}
