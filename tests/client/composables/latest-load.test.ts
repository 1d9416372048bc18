import { describe, expect, it } from 'vitest';
import { ApiRequestError } from '../../../src/api/errors';
import { useLatestLoad } from '../../../src/composables/use-latest-load';

function deferred<T>() {
  let resolve!: (value: T) => void;
  let reject!: (reason: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

describe('useLatestLoad', () => {
  it('keeps only the newer answer when two loads overlap', async () => {
    const { loading, run } = useLatestLoad();
    const first = deferred<string>();
    const second = deferred<string>();
    let shown = '';
    const a = run(async (isCurrent) => {
      const v = await first.promise;
      if (isCurrent()) shown = v;
    });
    const b = run(async (isCurrent) => {
      const v = await second.promise;
      if (isCurrent()) shown = v;
    });
    second.resolve('newer');
    await b;
    first.resolve('older');
    await a;
    expect(shown).toBe('newer');
    expect(loading.value).toBe(false);
  });

  it('turns a failure into the text of the inline error when the read is refused', async () => {
    const { error, notFound, run } = useLatestLoad();
    await run(async () => {
      throw new ApiRequestError('FORBIDDEN', 'Your role in this club does not allow this.', 403);
    });
    expect(error.value).toBe('Your role in this club does not allow this.');
    expect(notFound.value).toBe(false);
  });

  it('keeps a 404 apart from other failures when the page is about one record', async () => {
    const { error, notFound, run } = useLatestLoad({ notFound: true });
    await run(async () => {
      throw new ApiRequestError('NOT_FOUND', 'This item does not exist.', 404);
    });
    expect(notFound.value).toBe(true);
    expect(error.value).toBeNull();
  });

  it('ignores the answer of a load under way when it is cancelled', async () => {
    const { loading, error, run, cancel } = useLatestLoad();
    const pending = deferred<void>();
    const load = run(async () => {
      await pending.promise;
      throw new Error('too late');
    });
    cancel();
    expect(loading.value).toBe(false);
    pending.resolve();
    await load;
    expect(error.value).toBeNull();
  });
});
