/** Bad or missing input to string sizing: the message names the input and the fault. */
export class StringSizingError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StringSizingError';
  }
}
