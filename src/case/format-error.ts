/**
 * A record or file that does not match the case definition: the message names the path of the
 * first bad field. Kept apart from the definition (shape.ts) so that modules which only throw or
 * catch it (nesting, storage policy) do not pull the schema library into their bundles.
 */
export class CaseFormatError extends Error {
  readonly path: string;
  constructor(path: string, problem: string) {
    super(`${path}: ${problem}`);
    this.name = 'CaseFormatError';
    this.path = path;
  }
}
