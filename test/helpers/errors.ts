// Catches the StopspanError a call must throw (or a promise must reject with), so a test can pin its code
// and message; any other exception, or none, fails the test.
import { StopspanError } from '../../src/common/errors.js';

export function thrown(f: () => unknown): StopspanError {
  try {
    f();
  } catch (e) {
    if (e instanceof StopspanError) return e;
    throw e;
  }
  throw new Error('expected a StopspanError');
}

export async function rejected(p: Promise<unknown>): Promise<StopspanError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof StopspanError) return e;
    throw e;
  }
  throw new Error('expected a StopspanError');
}
