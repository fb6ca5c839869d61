import { MAX_CASE_FILE_BYTES } from '../../../src/case';
import { useState } from 'preact/hooks';
import { message as t, send } from '../../shared/browser';
import { saveText } from '../download';
import { kb } from './text';

/** Every case exported as one file; a case file imported (checked whole first, its size before its contents). */
export function ImportExport({ say }: { say: (msg: string) => void }) {
  const [importError, setImportError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const exportAll = async () => {
    try {
      const f = await send('cases/export', {});
      saveText(f.text, f.fileName);
      say(t('logExported', f.fileName));
    } catch (e) {
      say(t('logExportFailed', (e as Error).message));
    }
  };
  const importFile = async (input: HTMLInputElement) => {
    const file = input.files?.[0];
    if (!file) return;
    setImportError(null);
    if (file.size > MAX_CASE_FILE_BYTES) {
      setImportError(t('logImportTooBig', [file.name, kb(file.size), kb(MAX_CASE_FILE_BYTES)]));
      input.value = '';
      return;
    }
    setBusy(true);
    try {
      const r = await send('cases/import', { text: await file.text() });
      say(t('logImported', [String(r.added.length), String(r.merged.length)]));
    } catch (e) {
      // rejected whole: the message names the first bad field and its path; nothing was stored
      setImportError(t('logImportRejected', [file.name, (e as Error).message]));
    } finally {
      setBusy(false);
      input.value = '';
    }
  };
  return (
    <section class="log-io" aria-label={t('logIoLabel')}>
      <button type="button" class="secondary" data-testid="log-export-all" onClick={exportAll}>
        {t('logExportAll')}
      </button>
      <div class="field log-import">
        <label for="log-import">{t('logImportLabel')}</label>
        <input
          id="log-import"
          type="file"
          accept=".json,application/json"
          data-testid="log-import"
          disabled={busy}
          aria-invalid={importError ? 'true' : 'false'}
          aria-describedby={importError ? 'log-import-error' : undefined}
          onChange={(e) => void importFile(e.target as HTMLInputElement)}
        />
        {importError && (
          <div class="error" id="log-import-error" role="alert" data-testid="log-import-error">
            {importError}
          </div>
        )}
      </div>
    </section>
  );
}
