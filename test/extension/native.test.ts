import { afterEach, describe, expect, it, vi } from 'vitest';
import { nativeApis, send } from '../../extension/shared/native';

/*
 * The seam's polyfill-free part, against stand-ins for the browser's own objects: Chromium's
 * `chrome` and Firefox's `browser` both return promises from runtime.sendMessage in Manifest V3
 * (their extension API references; checked in the built extension by the browser suite).
 */
const g = globalThis as unknown as { chrome?: unknown; browser?: unknown };

function fakeApis(reply: unknown) {
  return { runtime: { sendMessage: vi.fn(async () => reply) }, storage: { local: {}, onChanged: {} } };
}

afterEach(() => {
  delete g.chrome;
  delete g.browser;
});

describe('nativeApis', () => {
  it("uses Firefox's browser object when it has runtime, else Chromium's chrome", () => {
    const chrome = fakeApis(undefined);
    g.chrome = chrome;
    expect(nativeApis()).toBe(chrome);
    const firefox = fakeApis(undefined);
    g.browser = firefox;
    expect(nativeApis()).toBe(firefox);
    // a page-defined or partial `browser` global without runtime does not win
    g.browser = { i18n: {} };
    expect(nativeApis()).toBe(chrome);
  });

  it('says so where there are no extension APIs', () => {
    expect(() => nativeApis()).toThrow('extension APIs are not available here');
  });
});

describe('send', () => {
  it('sends the typed envelope and unwraps an ok reply', async () => {
    const apis = fakeApis({ ok: true, value: { version: '9.9.9', schema: 1, startedAt: 5 } });
    g.chrome = apis;
    await expect(send('status/get', {})).resolves.toEqual({ version: '9.9.9', schema: 1, startedAt: 5 });
    expect(apis.runtime.sendMessage).toHaveBeenCalledWith(expect.objectContaining({ type: 'status/get', payload: {} }));
  });

  it("throws the background's error", async () => {
    g.chrome = fakeApis({ ok: false, error: 'case not found: c1' });
    await expect(send('case/get', { caseId: 'c1' })).rejects.toThrow('case not found: c1');
  });

  it('throws when nobody replied', async () => {
    g.chrome = fakeApis(undefined);
    await expect(send('case/get', { caseId: 'c1' })).rejects.toThrow('no reply to case/get');
  });
});
