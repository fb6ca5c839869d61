import type { ComponentChildren } from 'preact';

/*
 * The one shape of a field on the extension's pages (popup, case view, log, settings): a label, the
 * control, and under it an error or else a hint. Each field still commits its own way (on blur or
 * Enter, through a dirty flag, or on change); only the shape is shared.
 */

/** A labelled control; an error is announced (role alert) and named by the control's describedBy. */
export function FormField({ id, label, error, hint, extraClass, children }: {
  id: string;
  label: ComponentChildren;
  error?: string | null;
  hint?: ComponentChildren;
  extraClass?: string;
  children: ComponentChildren;
}) {
  return (
    <div class={extraClass ? `field ${extraClass}` : 'field'}>
      <label for={id}>{label}</label>
      {children}
      {error ? (
        <div class="error" id={`${id}-error`} role="alert">
          {error}
        </div>
      ) : hint ? (
        <div class="muted small" id={`${id}-hint`}>
          {hint}
        </div>
      ) : null}
    </div>
  );
}

/** The attributes that tie a control to what its FormField shows under it. */
export function describedBy(id: string, error: string | null | undefined, hasHint = false): { 'aria-invalid': 'true' | 'false'; 'aria-describedby'?: string } {
  const by = error ? `${id}-error` : hasHint ? `${id}-hint` : undefined;
  return by ? { 'aria-invalid': error ? 'true' : 'false', 'aria-describedby': by } : { 'aria-invalid': 'false' };
}

/** A typed field that commits when it is left or on Enter. */
export function commitsOnLeave(commit: () => void): { onBlur: () => void; onKeyDown: (e: KeyboardEvent) => void } {
  return { onBlur: commit, onKeyDown: (e) => e.key === 'Enter' && commit() };
}

/** The value of the control an input or change event came from. */
export function valueOf(e: Event): string {
  return (e.currentTarget as HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement).value;
}
