/** Bad input to the batch-quality functions: the message names the input and what is wrong. */
export class QualityError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'QualityError';
  }
}
