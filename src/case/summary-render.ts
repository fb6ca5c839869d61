/*
 * The summary's document model and its two renderings, plain text and Markdown. Leaves are plain
 * strings; each renderer escapes or wraps them its own way, so the two cannot differ in content.
 */

/* ----------------------------------------------------------------------------------------------
 * Document model. Leaves are plain strings; each renderer escapes or wraps them its own way.
 */

export type Block =
  | { kind: 'para'; text: string }
  | { kind: 'list'; items: string[] }
  | { kind: 'fields'; rows: Row[] }
  | { kind: 'sub'; title: string; blocks: Block[] }
  | { kind: 'table'; head: string[]; rows: string[][] };

/** A label and its value; 'address' marks a web address, which Markdown shows as a link. */
export type Row = [string, string] | [string, string, 'address'];

export interface Section {
  title: string;
  blocks: Block[];
}

export interface Doc {
  title: string;
  sections: Section[];
  closing: string;
}

/* ----------------------------------------------------------------------------------------------
 * Plain text: underlined headings, aligned label columns, prose wrapped under 100 characters.
 */

const WIDTH = 99;

export function renderText(doc: Doc): string {
  const out: string[] = [doc.title, '='.repeat(doc.title.length), ''];
  for (const s of doc.sections) {
    out.push(s.title, '-'.repeat(s.title.length), '');
    for (const b of s.blocks) textBlock(b, '', out);
  }
  out.push(...wrap(clean(doc.closing), '', ''));
  return `${out.join('\n')}\n`;
}

function textBlock(b: Block, indent: string, out: string[]): void {
  switch (b.kind) {
    case 'para':
      out.push(...wrap(clean(b.text), indent, indent), '');
      return;
    case 'list':
      for (const item of b.items) out.push(...wrap(clean(item), `${indent}- `, `${indent}  `));
      out.push('');
      return;
    case 'fields':
      textFields(b.rows, indent, out);
      out.push('');
      return;
    case 'sub':
      out.push(`${indent}${clean(b.title)}`, `${indent}${'~'.repeat(clean(b.title).length)}`);
      for (const inner of b.blocks) textBlock(inner, `${indent}  `, out);
      return;
    case 'table':
      // one aligned block per row, the first column as its heading: a seven-column table does not fit 100 characters
      for (const row of b.rows) {
        out.push(`${indent}${clean(row[0] ?? '')}`);
        textFields(b.head.slice(1).map((h, i) => [h, row[i + 1] ?? ''] as [string, string]), `${indent}  `, out);
        out.push('');
      }
      return;
  }
}

function textFields(rows: readonly Row[], indent: string, out: string[]): void {
  const w = Math.min(34, Math.max(...rows.map(([l]) => clean(l).length)));
  for (const [label, value] of rows) {
    const l = clean(label);
    const head = `${indent}${l}${' '.repeat(Math.max(1, w - l.length + 2))}`;
    out.push(...wrap(clean(value), head, ' '.repeat(head.length)));
  }
}

/** Control characters and line breaks from a page's title or a free text become single spaces. */
function clean(s: string): string {
  return String(s).replace(/[\u0000-\u001f\u007f\u2028\u2029]+/g, ' ').replace(/ {2,}/g, ' ').trim();
}

/*
 * Greedy word wrap that keeps a figure whole: no break inside parentheses (an interval) and none
 * right after a number (its unit follows), so a wrapped line never separates a median from its
 * interval. A word longer than the line (an address) stays whole on a line of its own.
 */
function wrap(text: string, first: string, rest: string): string[] {
  const words = text.split(' ');
  const chunks: string[] = [];
  let depth = 0;
  let cur = '';
  for (const w of words) {
    const glue = cur !== '' && (depth > 0 || /\d$/.test(cur));
    if (glue) cur += ` ${w}`;
    else {
      if (cur !== '') chunks.push(cur);
      cur = w;
    }
    for (const ch of w) {
      if (ch === '(') depth++;
      else if (ch === ')') depth = Math.max(0, depth - 1);
    }
  }
  if (cur !== '') chunks.push(cur);
  const lines: string[] = [];
  let line = first;
  let empty = true;
  for (const c of chunks) {
    if (empty) {
      line += c;
      empty = false;
    } else if (line.length + 1 + c.length <= WIDTH) line += ` ${c}`;
    else {
      lines.push(line);
      line = rest + c;
    }
  }
  lines.push(line);
  return lines.map((l) => l.replace(/\s+$/, ''));
}

/* ----------------------------------------------------------------------------------------------
 * Markdown: ## headings, lists, one table for the per-timestamp figures. Every leaf is escaped, so
 * a page title cannot turn into a link, an image, HTML or a broken table.
 */

function md(s: string): string {
  return clean(s).replace(/[\\`*_[\]<>|&~#]/g, (ch) => `\\${ch}`);
}

/*
 * A web address as an autolink, inside which backslash escapes would not be undone; one that could
 * break out of the angle brackets (spaces, < or >) is shown as escaped text instead.
 */
function mdAddress(url: string): string {
  const u = clean(url);
  return /^https?:\/\/[^\s<>]+$/i.test(u) ? `<${u}>` : md(u);
}

export function renderMarkdown(doc: Doc): string {
  const out: string[] = [`# ${md(doc.title)}`, ''];
  for (const s of doc.sections) {
    out.push(`## ${md(s.title)}`, '');
    for (const b of s.blocks) mdBlock(b, 3, out);
  }
  out.push(md(doc.closing));
  return `${out.join('\n')}\n`;
}

function mdBlock(b: Block, level: number, out: string[]): void {
  switch (b.kind) {
    case 'para':
      out.push(md(b.text), '');
      return;
    case 'list':
      for (const item of b.items) out.push(`- ${md(item)}`);
      out.push('');
      return;
    case 'fields':
      for (const [label, value, type] of b.rows) out.push(`- **${md(label)}:** ${type === 'address' ? mdAddress(value) : md(value)}`);
      out.push('');
      return;
    case 'sub':
      out.push(`${'#'.repeat(level)} ${md(b.title)}`, '');
      for (const inner of b.blocks) mdBlock(inner, level + 1, out);
      return;
    case 'table':
      out.push(`| ${b.head.map(md).join(' | ')} |`, `|${b.head.map(() => ' --- |').join('')}`);
      for (const row of b.rows) out.push(`| ${b.head.map((_, i) => md(row[i] ?? '')).join(' | ')} |`);
      out.push('');
      return;
  }
}
