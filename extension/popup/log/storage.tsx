import type { QuarantineEntry, StorageUsage } from '../../../src/case';
import { message as t } from '../../shared/browser';
import { day, kb } from './text';

/** Storage in use (warned of near the quota) and the records set aside as unreadable. */
export function Storage({ usage, quarantined }: { usage: StorageUsage; quarantined: QuarantineEntry[] }) {
  return (
    <section class="log-storage" aria-label={t('logStorageLabel')}>
      <p class={usage.nearLimit ? 'log-warn' : 'muted'} role={usage.nearLimit ? 'alert' : undefined} data-testid="log-usage">
        {t('logUsage', [kb(usage.bytesInUse), kb(usage.quotaBytes)])}
        {usage.nearLimit ? ` ${t('logNearLimit')}` : ''}
      </p>
      {quarantined.length > 0 && (
        <details class="log-quarantine" data-testid="log-quarantine" open>
          <summary>{t('logQuarantined', String(quarantined.length))}</summary>
          <p class="muted">{t('logQuarantineWhy')}</p>
          <ul>
            {quarantined.map((q) => (
              <li>
                <code>{q.key}</code>
                {q.quarantinedAt > 0 ? ` (${day(q.quarantinedAt)})` : ''}: {q.reason}
              </li>
            ))}
          </ul>
        </details>
      )}
    </section>
  );
}
