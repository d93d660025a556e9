/**
 * A promise with its settle functions held outside it, for a result that arrives later as a
 * message (from a worker thread). Its rejection counts as handled until someone awaits it, so a
 * failure that comes while the sender is still busy is not reported as unhandled.
 */
export interface Deferred<T> {
  promise: Promise<T>;
  resolve: (value: T) => void;
  reject: (error: Error) => void;
}

export function deferred<T>(): Deferred<T> {
  let resolve: (value: T) => void = () => undefined;
  let reject: (error: Error) => void = () => undefined;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  promise.catch(() => undefined);
  return { promise, resolve, reject };
}
