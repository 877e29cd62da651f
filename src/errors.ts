/**
 * An error caused by what the user gave us (a file, a value, a flag). The CLI prints its message as
 * one line and exits non-zero, without a stack trace. The message must name what is wrong and where
 * (file, JSON path, value, expected unit).
 */
export class UserError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UserError';
  }
}
