import { shownTitle, visibleRows } from '../../../src/case';
import type { CaseListing, UnitSystem } from '../../../src/case';
import { useEffect, useRef, useState } from 'preact/hooks';
import { message as t } from '../../shared/browser';
import { HeadlineCell } from './headline-cell';
import { day, statusWord } from './text';

/*
 * The list of cases. It draws only the rows in view (src/case/log.ts visibleRows), so 1 000 cases
 * cost what 20 do.
 */

// rows are one fixed height in rem, so the window arithmetic holds at any zoom or font size
const ROW_REM = 4.25;
const OVERSCAN = 6;

function Row({ c, index, active, selected, system, onPick }: { c: CaseListing; index: number; active: boolean; selected: boolean; system: UnitSystem; onPick: (i: number) => void }) {
  return (
    <div
      id={`log-row-${c.id}`}
      role="option"
      aria-selected={selected ? 'true' : 'false'}
      class={`log-row${active ? ' active' : ''}${selected ? ' selected' : ''}`}
      data-testid="log-row"
      data-case-id={c.id}
      onClick={() => onPick(index)}
    >
      <div class="log-row-title">{shownTitle(c)}</div>
      <div class="log-row-meta muted">
        <span>{c.site || t('logNoSite')}</span> · <span>{day(c.updatedAt)}</span> · <span class={`log-status log-status-${c.status}`} data-testid="row-status">{statusWord(c.status)}</span>
        {c.tags.length > 0 && (
          <>
            {' · '}
            {c.tags.map((tag) => (
              <span class="log-tag">{tag}</span>
            ))}
          </>
        )}
        {' · '}
        {t('logMarkCount', String(c.markCount))}
      </div>
      <div class="log-row-headline">
        <HeadlineCell c={c} system={system} />
      </div>
    </div>
  );
}

function rowHeightPx(): number {
  const rem = Number.parseFloat(getComputedStyle(document.documentElement).fontSize) || 16;
  return ROW_REM * rem;
}

/**
 * The rows as a listbox: one tab stop, arrow keys (Home, End, Page Up/Down too) move through the
 * rows, Enter or Space opens the one under the cursor. Only the window of rows in view exists in
 * the DOM; the active row is always scrolled into it, so aria-activedescendant names a real node.
 */
export function CaseList({ cases, selectedId, system, onSelect }: { cases: CaseListing[]; selectedId: string | null; system: UnitSystem; onSelect: (id: string, byKey: boolean) => void }) {
  const box = useRef<HTMLDivElement>(null);
  const [scrollTop, setScrollTop] = useState(0);
  const [viewport, setViewport] = useState(480);
  const [rowHeight, setRowHeight] = useState(80);
  const [active, setActive] = useState(0);
  useEffect(() => {
    const el = box.current!;
    const measure = () => {
      setViewport(el.clientHeight);
      setRowHeight(rowHeightPx());
    };
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  // a filter that shrinks the list keeps the cursor on a row that exists
  const cursor = Math.min(active, Math.max(0, cases.length - 1));
  const w = visibleRows({ rowHeight, viewportHeight: viewport, scrollTop, count: cases.length, overscan: OVERSCAN });
  const moveTo = (i: number) => {
    const n = Math.max(0, Math.min(cases.length - 1, i));
    setActive(n);
    const el = box.current!;
    const top = n * rowHeight;
    if (top < el.scrollTop) el.scrollTop = top;
    else if (top + rowHeight > el.scrollTop + el.clientHeight) el.scrollTop = top + rowHeight - el.clientHeight;
    setScrollTop(el.scrollTop);
  };
  const pick = (i: number, byKey = false) => {
    const c = cases[i];
    if (!c) return;
    setActive(i);
    onSelect(c.id, byKey);
  };
  const onKey = (e: KeyboardEvent) => {
    const page = Math.max(1, Math.floor(viewport / rowHeight) - 1);
    const moves: Record<string, number> = { ArrowDown: cursor + 1, ArrowUp: cursor - 1, Home: 0, End: cases.length - 1, PageDown: cursor + page, PageUp: cursor - page };
    if (e.key in moves) {
      e.preventDefault();
      moveTo(moves[e.key]!);
    } else if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      pick(cursor, true);
    }
  };
  const activeId = cases[cursor] ? `log-row-${cases[cursor]!.id}` : undefined;
  return (
    <div
      ref={box}
      class="log-list"
      role="listbox"
      tabIndex={0}
      aria-label={t('logListLabel')}
      aria-activedescendant={activeId}
      data-testid="log-list"
      data-rendered={String(w.end - w.start)}
      onScroll={(e) => setScrollTop((e.currentTarget as HTMLDivElement).scrollTop)}
      onKeyDown={onKey}
    >
      <div style={{ height: `${w.totalHeight}px`, position: 'relative' }}>
        <div style={{ position: 'absolute', top: `${w.offsetTop}px`, left: 0, right: 0 }}>
          {cases.slice(w.start, w.end).map((c, k) => (
            <Row key={c.id} c={c} index={w.start + k} active={w.start + k === cursor} selected={c.id === selectedId} system={system} onPick={pick} />
          ))}
        </div>
      </div>
    </div>
  );
}
