/**
 * A promise with its resolve and reject (Promise.withResolvers, which Node 20 lacks). A rejection
 * before anyone awaits it is not reported as unhandled: the caller awaits it later.
 */
export function pending<T>(): {
  promise: Promise<T>;
  resolve: (value: T) => void;
  reject: (error: Error) => void;
} {
  let resolve: (value: T) => void = () => undefined;
  let reject: (error: Error) => void = () => undefined;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  promise.catch(() => undefined);
  return { promise, resolve, reject };
}
