import { CASE_STATUSES, checkNotes, parseTags } from '../../../src/case';
import type { CaseListing, CaseStatus } from '../../../src/case';
import { useEffect, useRef, useState } from 'preact/hooks';
import { message as t, send } from '../../shared/browser';
import { describedBy, FormField, valueOf } from '../../shared/form-field';
import { statusWord } from './text';

/**
 * Notes, status and tags of one case. While the user has unsaved edits, a change saved elsewhere
 * (another tab, an import) does not overwrite what they are typing: the form says so instead, and
 * saving then sets these three fields to what is in the form (the marks are never touched).
 */
export function Annotate({ c, onSaved }: { c: CaseListing; onSaved: (msg: string) => void }) {
  const [notes, setNotes] = useState(c.notes);
  const [status, setStatus] = useState<CaseStatus>(c.status);
  const [tags, setTags] = useState(c.tags.join(', '));
  const [dirty, setDirty] = useState(false);
  const [changedElsewhere, setChangedElsewhere] = useState(false);
  const seen = useRef(c.updatedAt);
  useEffect(() => {
    if (c.updatedAt === seen.current) return;
    seen.current = c.updatedAt;
    if (dirty) {
      setChangedElsewhere(true);
      return;
    }
    setNotes(c.notes);
    setStatus(c.status);
    setTags(c.tags.join(', '));
  }, [c.updatedAt]);
  const [tagError, setTagError] = useState<string | null>(null);
  const [notesError, setNotesError] = useState<string | null>(null);
  const [saveError, setSaveError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const save = async (e: Event) => {
    e.preventDefault();
    let parsed: string[] | null = null;
    try {
      parsed = parseTags(tags);
      setTagError(null);
    } catch (err) {
      setTagError((err as Error).message);
    }
    try {
      checkNotes(notes);
      setNotesError(null);
    } catch (err) {
      setNotesError((err as Error).message);
      return;
    }
    if (!parsed) return;
    setBusy(true);
    try {
      const saved = await send('case/annotate', { caseId: c.id, notes, status, tags: parsed });
      // the listing that follows this save carries this version: it is ours, not a change elsewhere
      seen.current = saved.updatedAt;
      setSaveError(null);
      setDirty(false);
      setChangedElsewhere(false);
      setTags(parsed.join(', '));
      onSaved(t('logSaved'));
    } catch (err) {
      // the background names the field; what was saved before stays as it was
      setSaveError(t('logNotSaved', (err as Error).message));
    } finally {
      setBusy(false);
    }
  };
  return (
    <form class="log-annotate" onSubmit={save} aria-label={t('logAnnotateLabel')}>
      <FormField id="log-notes" label={t('logNotesLabel')} error={notesError}>
        <textarea
          id="log-notes"
          data-testid="log-notes"
          rows={4}
          value={notes}
          {...describedBy('log-notes', notesError)}
          onInput={(e) => {
            setNotes(valueOf(e));
            setDirty(true);
          }}
        />
      </FormField>
      <FormField id="log-status" label={t('logStatusLabel')}>
        <select id="log-status" data-testid="log-status" value={status} onChange={(e) => {
            setStatus(valueOf(e) as CaseStatus);
            setDirty(true);
          }}
        >
          {CASE_STATUSES.map((s) => (
            <option value={s}>{statusWord(s)}</option>
          ))}
        </select>
      </FormField>
      <FormField id="log-tags" label={t('logTagsLabel')} error={tagError} hint={t('logTagsHint')}>
        <input
          id="log-tags"
          data-testid="log-tags"
          value={tags}
          placeholder={t('logTagsHint')}
          {...describedBy('log-tags', tagError, true)}
          onInput={(e) => {
            setTags(valueOf(e));
            setDirty(true);
          }}
        />
      </FormField>
      {changedElsewhere && (
        <p class="log-warn" role="status" data-testid="log-changed-elsewhere">
          {t('logChangedElsewhere')}
        </p>
      )}
      <button type="submit" class="primary" disabled={busy} data-testid="log-save">
        {t('logSave')}
      </button>
      {saveError && (
        <p class="error" role="alert" data-testid="log-save-error">
          {saveError}
        </p>
      )}
    </form>
  );
}
