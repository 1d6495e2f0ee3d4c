import { describe, expect, it } from 'vitest';
import { tokenCache } from '../../server/http/auth';

describe('decoded session tokens kept per Cookie header', () => {
  it('decodes a cookie once while its token lasts, and again once it has expired', async () => {
    let now = 1_000;
    let decodes = 0;
    const tokens = tokenCache(10, () => now);
    const decode = async () => (decodes++, { sub: '7', exp: 1_060 });
    expect(await tokens('authjs.session-token=a', decode)).toMatchObject({ sub: '7' });
    expect(await tokens('authjs.session-token=a', decode)).toMatchObject({ sub: '7' });
    expect(decodes).toBe(1);
    now = 1_060;
    await tokens('authjs.session-token=a', async () => (decodes++, null));
    expect(decodes).toBe(2);
  });

  it('never keeps a cookie that did not decode, nor a missing one', async () => {
    let decodes = 0;
    const tokens = tokenCache(10, () => 0);
    const bad = async () => (decodes++, null);
    expect(await tokens('authjs.session-token=forged', bad)).toBeNull();
    expect(await tokens('authjs.session-token=forged', bad)).toBeNull();
    expect(decodes).toBe(2);
    expect(await tokens(undefined, bad)).toBeNull();
    expect(decodes).toBe(2);
  });

  it('holds at most its bound, dropping the oldest first', async () => {
    let decodes = 0;
    const tokens = tokenCache(2, () => 0);
    const decode = async () => (decodes++, { sub: '1', exp: 100 });
    for (const c of ['a', 'b', 'c']) await tokens(c, decode);
    await tokens('c', decode);
    await tokens('b', decode);
    expect(decodes).toBe(3);
    await tokens('a', decode);
    expect(decodes).toBe(4);
  });
});
