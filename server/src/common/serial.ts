/** Runs tasks one at a time, in the order they were given (a promise-chain mutex). */
export class SerialRunner {
  private tail: Promise<unknown> = Promise.resolve();

  run<T>(task: () => Promise<T>): Promise<T> {
    const result = this.tail.then(task, task);
    this.tail = result.catch(() => undefined);
    return result;
  }
}
