/**
 * Error for a material or stack file that cannot be read or is malformed. The message starts
 * with the file and names the field or line: `my.csv: line 7: k must be >= 0, received -0.1`.
 * (Not a RangeError/TypeError on purpose: the CLI reports bad files as failed input, exit 3.)
 */
export class DataFileError extends Error {
  override readonly name = 'DataFileError';
  constructor(
    readonly file: string,
    readonly detail: string,
  ) {
    super(`${file}: ${detail}`);
  }
}
