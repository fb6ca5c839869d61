import { SCHEMA_VERSION } from '../../src/case';
import { browser, extensionVersion, message } from '../shared/browser';
import { store } from './cases';
import { injectOverlay, type CallUpOptions } from './call-up';
import './announce';
import { foreignFrameOrigins, injectIntoOrigin } from './inject';
import { routeMessages, type Guard } from './router';
import { judge, needsCasePage, refusal, type SenderFacts } from './senders';

const MENU_ID = 'clip-caliper-measure-video';
// when this worker instance started: a worker the browser stopped comes back as a new instance
const STARTED_AT = Date.now();
export const COMMAND_ID = 'measure-video';

/** Who asks (senders.ts decides): the facts the browser sets on each message, and the stored case's page when one is named. */
const guard: Guard = async (type, payload, sender) => {
  const facts: SenderFacts = { url: sender.url, tabId: sender.tab?.id, tabActive: sender.tab?.active };
  const origin = browser.runtime.getURL('');
  const caseId = needsCasePage(type, facts, origin, payload);
  const casePage = caseId === null ? undefined : await store.casePageOf(caseId);
  const verdict = judge(type, payload, facts, origin, casePage);
  return verdict.allow ? null : refusal(type, verdict.reason);
};

browser.runtime.onMessage.addListener(
  routeMessages({
    'status/get': async () => ({ version: extensionVersion(), schema: SCHEMA_VERSION, startedAt: STARTED_AT }),
    'case/open': async ({ caseId, video }) => store.openCase(caseId, video, extensionVersion()),
    'case/get': async ({ caseId }) => store.readCase(caseId),
    'cases/forPage': async ({ pageUrl }) => store.casesForPage(pageUrl),
    'mark/put': async ({ caseId, mark }) => store.putMark(caseId, mark),
    'marks/put': async ({ caseId, marks }) => store.putMarks(caseId, marks),
    'mark/remove': async ({ caseId, markId }) => store.deleteMark(caseId, markId),
    'case/assume': async ({ caseId, assumptions }) => store.setAssumptions(caseId, assumptions),
    'overlay/inject': async ({ tabId }) => ({ injected: await injectOverlay(tabId) }),
    'frame/capture': async (_p, sender) => {
      // activeTab (granted when the user called the overlay up) allows capturing that tab
      const windowId = sender.tab?.windowId;
      if (windowId === undefined) throw new Error('capture: not sent from a tab');
      return { dataUrl: await browser.tabs.captureVisibleTab(windowId, { format: 'png' }) };
    },
    'frames/foreign': async ({ tabId }) => ({ origins: await foreignFrameOrigins(tabId) }),
    'overlay/inject-origin': async ({ tabId, origin }) => ({ frames: await injectIntoOrigin(tabId, origin) }),
    'cases/list': async () => store.listCases(),
    'case/annotate': async ({ caseId, notes, status, tags }) => store.annotateCase(caseId, { notes, status, tags }),
    'case/delete': async ({ caseId }) => store.deleteCase(caseId),
    'case/undelete': async ({ caseId }) => store.undeleteCase(caseId),
    'cases/deleted': async () => store.listDeleted(),
    'cases/import': async ({ text }) => store.importCases(text),
    'cases/export': async ({ caseIds }) => store.exportCases(caseIds),
    'storage/usage': async () => store.storageUsage(),
    'seek/request': async ({ pageUrl, t }) => store.requestSeek(pageUrl, t),
    'seek/take': async ({ pageUrl }) => store.takeSeek(pageUrl),
  }, guard),
);

browser.runtime.onInstalled.addListener(() => {
  browser.contextMenus.create({ id: MENU_ID, title: message('menuMeasureVideo'), contexts: ['video'] });
});

/**
 * A call-up from the keyboard or the menu has no popup to show its failure in: the toolbar button
 * of that tab shows "!" and says why in its title, until the next call-up there.
 */
async function callUpFromGesture(tabId: number, options: CallUpOptions = {}): Promise<void> {
  await browser.action.setBadgeText({ tabId, text: '' }).catch(() => undefined);
  try {
    await injectOverlay(tabId, options);
    await browser.action.setTitle({ tabId, title: message('actionTitle') }).catch(() => undefined);
  } catch (err) {
    await browser.action.setBadgeText({ tabId, text: '!' }).catch(() => undefined);
    await browser.action.setTitle({ tabId, title: message('callUpBadgeTitle', err instanceof Error ? err.message : String(err)) }).catch(() => undefined);
  }
}

browser.contextMenus.onClicked.addListener((info, tab) => {
  if (info.menuItemId === MENU_ID && tab?.id !== undefined) void callUpFromGesture(tab.id, { ...(info.frameId ? { frameId: info.frameId } : {}), ...(info.srcUrl ? { videoSrc: info.srcUrl } : {}) });
});

browser.commands.onCommand.addListener((command, tab) => {
  if (command === COMMAND_ID && tab?.id !== undefined) void callUpFromGesture(tab.id);
});

