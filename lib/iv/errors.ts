/**
 * Every problem with I-V input (file content, metadata, curve shape, options) is an IvInputError.
 * `code` is stable for programs (the API maps it), `line` is the 1-based file line when known,
 * and the message is a sentence a test engineer can act on.
 */
export class IvInputError extends Error {
  readonly code: string;
  readonly line?: number;

  constructor(code: string, message: string, line?: number) {
    super(line === undefined ? message : `line ${line}: ${message}`);
    this.name = 'IvInputError';
    this.code = code;
    if (line !== undefined) this.line = line;
  }
}
