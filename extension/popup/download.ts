/**
 * Saves bytes made here as a file, through an object URL on a link with `download` (HTML Living
 * Standard, "Downloading resources"): the file never leaves the machine and no `downloads`
 * permission is asked for. The link is put in the document for the click (Firefox ignores a click
 * on a detached link) and the URL is revoked only later, not at once: the download reads it after
 * the click returns (common practice: FileSaver.js waits 40 s for the same reason).
 */
export const REVOKE_AFTER_MS = 10_000;

export function saveFile(data: Blob, fileName: string): void {
  const a = document.createElement('a');
  const url = URL.createObjectURL(data);
  a.href = url;
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), REVOKE_AFTER_MS);
}

/** Text as a UTF-8 file of the type its name says (.csv, .txt, else JSON). */
export function saveText(text: string, fileName: string): void {
  const type = fileName.endsWith('.csv') ? 'text/csv' : fileName.endsWith('.txt') ? 'text/plain' : 'application/json';
  saveFile(new Blob([text], { type: `${type};charset=utf-8` }), fileName);
}
