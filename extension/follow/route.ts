/** The full-tab view is the follow page when its address says `?view=follow` (main.tsx routes on this). */
export const isFollowRoute = () => new URLSearchParams(location.search).get('view') === 'follow';

/** The follow page's address for a case measured in a tab (and frame), from one of its object spans. */
export function followAddress(base: string, tabId: number, frameId: number, caseId: string, markId: string): string {
  const u = new URL(base);
  u.search = new URLSearchParams({ view: 'follow', tab: String(tabId), frame: String(frameId), case: caseId, mark: markId }).toString();
  u.hash = '';
  return u.href;
}
