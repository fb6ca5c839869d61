/** Saves text as a file the user downloads, typed by its name's ending. */
export function download(fileName: string, text: string): void {
  // an object URL of our own bytes: the file never leaves the machine
  const a = document.createElement('a');
  const type = fileName.endsWith('.csv') ? 'text/csv' : fileName.endsWith('.txt') ? 'text/plain' : 'application/json';
  a.href = URL.createObjectURL(new Blob([text], { type: `${type};charset=utf-8` }));
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
}
