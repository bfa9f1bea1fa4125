import { formatBytes } from '../engine/core';
import { plural } from './format';

/** What the paste box shows of pasted text instead of the text itself. */
export interface PasteSummary {
  /** Size of the text as UTF-8. */
  bytes: number;
  /** Lines of text; a line break at the very end starts no new line. */
  lines: number;
  /** Cells of the first line (tab-separated, or comma / semicolon when it holds no tab). */
  columns: number;
  /** The first few of those cells, each cut to a readable length, control characters shown as U+FFFD. */
  names: string[];
}

const SHOWN_NAMES = 6;
const NAME_CHARS = 24;
/** Only this much of the first line is split into names; the cells are still counted to the end of the line. */
const FIRST_LINE_CHARS = 4096;

/** UTF-8 length of a string, without encoding it. */
function utf8Length(text: string): number {
  let n = text.length;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdbff && i + 1 < text.length) {
      const d = text.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        n += 2; // 4 bytes for the pair's 2 code units
        i++;
        continue;
      }
    }
    if (c >= 0x800) n += 2;
    else if (c >= 0x80) n += 1;
  }
  return n;
}

function count(text: string, ch: string, from = 0, to = text.length): number {
  let n = 0;
  for (let i = text.indexOf(ch, from); i !== -1 && i < to; i = text.indexOf(ch, i + 1)) n++;
  return n;
}

/** Counts the lines and splits the first one into names, in one pass over the text: nothing is copied but line 1. */
export function summarisePaste(text: string): PasteSummary {
  const breakChar = text.includes('\n') ? '\n' : '\r'; // a lone CR ends lines in text from old Mac programs
  const breaks = count(text, breakChar);
  const lines = text.length === 0 ? 0 : breaks + (text.endsWith(breakChar) ? 0 : 1);
  let end = text.indexOf(breakChar);
  if (end === -1) end = text.length;
  if (end > 0 && text[end - 1] === '\r') end--;
  const head = text.slice(0, Math.min(end, FIRST_LINE_CHARS));
  const sep = head.includes('\t') ? '\t' : head.includes(',') ? ',' : head.includes(';') ? ';' : null;
  const columns = end === 0 ? 0 : sep === null ? 1 : count(text, sep, 0, end) + 1;
  const cells = sep === null ? [head] : head.split(sep, SHOWN_NAMES);
  const names = end === 0 ? [] : cells.map(shortName);
  return { bytes: utf8Length(text), lines, columns, names };
}

function shortName(cell: string): string {
  // eslint-disable-next-line no-control-regex -- control characters are shown as U+FFFD, never written raw
  const shown = cell.trim().replace(/[\u0000-\u001f\u007f]/g, '\ufffd');
  if (shown === '') return '(empty)';
  return shown.length > NAME_CHARS ? `${shown.slice(0, NAME_CHARS - 1)}…` : shown;
}

/** "6 MB, 100,001 lines. First line: id, age, sex, ward, bmi, asa, … (11 cells)". */
export function describePaste(s: PasteSummary): string {
  const size = s.bytes < 1024 ? plural(s.bytes, 'byte') : formatBytes(s.bytes);
  if (s.lines === 0) return `${size}: no lines`;
  if (s.names.length === 0) return `${size}, ${plural(s.lines, 'line')}. The first line is empty.`;
  const more = s.columns > s.names.length ? ', …' : '';
  return `${size}, ${plural(s.lines, 'line')}. First line: ${s.names.join(', ')}${more} (${plural(s.columns, 'cell')})`;
}
