/** The one error type the engine throws. `code` is stable; the message names the function. */
export class EngineError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = 'EngineError';
  }
}
