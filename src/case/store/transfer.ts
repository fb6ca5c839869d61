import { parseCaseFileAll, toCaseFile, toCasesFile } from '../casefile';
import { exportFileName, planImport } from '../importing';
import { caseKey, type CaseRecord } from '../schema';
import { CaseFormatError, validateCase } from '../validate';
import { missing, readUnlocked, setLocal, type StoreCore } from './core';
import { checkId, readableCases, readCase } from './edits';

/*
 * Import and export. An import is validated whole first (nothing is touched when any part is bad),
 * then merged (importing.ts planImport: a new id is added, a stored id keeps both versions, the
 * newer in front), weighed against the quota as one, and written in one storage call, holding the
 * queue of every case the file names.
 */
export async function importCases(core: StoreCore, text: unknown): Promise<{ added: string[]; merged: string[] }> {
  if (typeof text !== 'string') throw new CaseFormatError('text', 'expected the text of a case file');
  const incoming = parseCaseFileAll(text);
  const ids = [...new Set(incoming.map((c) => c.id))];
  return core.queue.runMany(ids, async () => {
    const stored = new Map<string, CaseRecord>();
    for (const id of ids) {
      const c = await readUnlocked(core, id); // a bad stored record is quarantined first, then the import adds
      if (c) stored.set(id, c);
    }
    const plan = planImport(stored, incoming, core.now());
    if (plan.writes.length > 0) {
      const items = Object.fromEntries(plan.writes.map((c) => [caseKey(c.id), validateCase(c)]));
      await setLocal(core, `import of ${plan.writes.length === 1 ? `case ${plan.writes[0]!.id}` : `${plan.writes.length} cases`}`, items);
    }
    return { added: plan.added, merged: plan.merged };
  });
}

/** A case file of the listed cases, or of every readable case (oldest first) when none are listed. */
export async function exportCases(core: StoreCore, caseIds?: unknown): Promise<{ fileName: string; text: string }> {
  let cases: CaseRecord[];
  if (caseIds === undefined) {
    cases = (await readableCases(core, await core.local.getAll())).cases;
    cases.sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : 1));
  } else {
    if (!Array.isArray(caseIds) || caseIds.length === 0) throw new CaseFormatError('caseIds', 'expected a list of case ids, or none for every case');
    cases = [];
    for (const id of caseIds.map(checkId)) {
      const c = await readCase(core, id);
      if (!c) throw missing(id);
      cases.push(c);
    }
  }
  if (cases.length === 0) throw new Error('no cases to export');
  const version = core.toolVersion();
  const file = cases.length === 1 ? toCaseFile(cases[0]!, version) : toCasesFile(cases, version);
  return { fileName: exportFileName(cases.map((c) => c.id), core.now()), text: `${JSON.stringify(file, null, 2)}\n` };
}
