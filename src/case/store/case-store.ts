import type { CaseListing, QuarantineEntry, StorageUsage } from '../listing';
import type { CaseAssumptions, CaseRecord, Mark, VideoInfo } from '../schema';
import { deleteCase, listCases, listDeleted, undeleteCase } from './case-log';
import { makeCore, storageUsage } from './core';
import { annotateCase, casePageOf, casesForPage, deleteMark, openCase, putMark, putMarks, readCase, setAssumptions } from './edits';
import type { StorePorts } from './port';
import { requestSeek, takeSeek } from './seek';
import { exportCases, importCases } from './transfer';

/*
 * The case store over a key-value port (port.ts): one key per case, so that two tabs working on
 * different cases never touch each other's data; per-case queues (queue.ts); validation and
 * quarantine on every read and the quota on every write (core.ts); the overlay's and popup's
 * edits (edits.ts); the log's listing, delete and undo (case-log.ts); import and export
 * (transfer.ts); seeks (seek.ts). It imports nothing from the browser: the background wires
 * browser storage to the port, and test/case/store/ runs it over an in-memory area.
 */
export interface CaseStore {
  readCase(id: string): Promise<CaseRecord | null>;
  casePageOf(id: string): Promise<string | null>;
  openCase(id: string, video: VideoInfo, version: string): Promise<CaseRecord>;
  putMark(id: string, mark: Mark): Promise<CaseRecord>;
  putMarks(id: string, marks: unknown): Promise<CaseRecord>;
  deleteMark(id: string, markId: string): Promise<CaseRecord>;
  setAssumptions(id: string, assumptions: CaseAssumptions): Promise<CaseRecord>;
  annotateCase(id: string, a: { notes?: unknown; status?: unknown; tags?: unknown }): Promise<CaseRecord>;
  casesForPage(pageUrl: string): Promise<{ cases: CaseRecord[]; unreadable: number }>;
  listCases(): Promise<{ cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage }>;
  deleteCase(id: string): Promise<{ deleted: true }>;
  listDeleted(): Promise<{ cases: { id: string; title: string; deletedAt: number }[] }>;
  undeleteCase(id: string): Promise<CaseRecord>;
  importCases(text: unknown): Promise<{ added: string[]; merged: string[] }>;
  exportCases(caseIds?: unknown): Promise<{ fileName: string; text: string }>;
  storageUsage(): Promise<StorageUsage>;
  requestSeek(pageUrl: unknown, t: unknown): Promise<Record<string, never>>;
  takeSeek(pageUrl: unknown): Promise<{ t: number | null }>;
  /** A change to the local area made by anyone else (a page, another view), for the log's index. */
  noteChange(key: string, value: unknown): void;
}

export function createCaseStore(ports: StorePorts): CaseStore {
  const core = makeCore(ports);
  return {
    readCase: (id) => readCase(core, id),
    casePageOf: (id) => casePageOf(core, id),
    openCase: (id, video, version) => openCase(core, id, video, version),
    putMark: (id, mark) => putMark(core, id, mark),
    putMarks: (id, marks) => putMarks(core, id, marks),
    deleteMark: (id, markId) => deleteMark(core, id, markId),
    setAssumptions: (id, assumptions) => setAssumptions(core, id, assumptions),
    annotateCase: (id, a) => annotateCase(core, id, a),
    casesForPage: (pageUrl) => casesForPage(core, pageUrl),
    listCases: () => listCases(core),
    deleteCase: (id) => deleteCase(core, id),
    listDeleted: () => listDeleted(core),
    undeleteCase: (id) => undeleteCase(core, id),
    importCases: (text) => importCases(core, text),
    exportCases: (caseIds) => exportCases(core, caseIds),
    storageUsage: () => storageUsage(core),
    requestSeek: (pageUrl, t) => requestSeek(core, pageUrl, t),
    takeSeek: (pageUrl) => takeSeek(core, pageUrl),
    noteChange: (key, value) => core.index.applyChange(key, value),
  };
}
