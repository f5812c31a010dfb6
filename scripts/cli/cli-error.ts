/** A usage or input error on the command line: printed as one line, exit code 2. */
export class CliError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "CliError";
  }
}
