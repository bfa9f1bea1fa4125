import { jsPDF } from 'jspdf';
import { liberationSansBold, liberationSansRegular } from './fonts/liberationSans';

export const FONT = 'LiberationSans';
const PT = 25.4 / 72;

export interface TableColumn {
  header: string;
  /** Width in mm. */
  width: number;
  align?: 'left' | 'right';
}

/**
 * A4 portrait page flow over jsPDF: a cursor `y` (mm) that moves down, page breaks that keep headings with
 * their first lines, wrapped paragraphs and simple ruled tables whose header repeats after a break.
 */
export class PdfLayout {
  readonly doc: jsPDF;
  readonly left = 18;
  readonly right = 192;
  readonly top = 20;
  readonly bottom = 277;
  y = 20;

  constructor() {
    this.doc = new jsPDF({ unit: 'mm', format: 'a4', orientation: 'portrait', compress: true });
    this.doc.addFileToVFS('LiberationSans-Regular.ttf', liberationSansRegular);
    this.doc.addFileToVFS('LiberationSans-Bold.ttf', liberationSansBold);
    this.doc.addFont('LiberationSans-Regular.ttf', FONT, 'normal', 'normal', 'Identity-H');
    this.doc.addFont('LiberationSans-Bold.ttf', FONT, 'bold', undefined, 'Identity-H');
    this.setFont(9.5);
  }

  get width(): number {
    return this.right - this.left;
  }

  setFont(size: number, bold = false): void {
    this.doc.setFont(FONT, bold ? 'bold' : 'normal');
    this.doc.setFontSize(size);
  }

  lineHeight(size: number): number {
    return size * PT * 1.3;
  }

  newPage(): void {
    this.doc.addPage('a4', 'portrait');
    this.y = this.top;
  }

  /** Starts a new page unless `height` mm still fit. */
  ensure(height: number): void {
    if (this.y + height > this.bottom) this.newPage();
  }

  /** A numbered section heading, kept on the same page as at least `keepWith` mm of what follows. */
  heading(text: string, keepWith = 24): void {
    this.ensure(12.5 + keepWith);
    this.y += 3;
    this.setFont(12.5, true);
    this.doc.setTextColor(20, 50, 90);
    this.doc.text(text, this.left, this.y + 4.5);
    this.doc.setDrawColor(20, 50, 90);
    this.doc.setLineWidth(0.3);
    this.doc.line(this.left, this.y + 6.3, this.right, this.y + 6.3);
    this.doc.setTextColor(0, 0, 0);
    this.y += 9.5;
  }

  private sections = 0;

  /** The numbered sections drawn so far, in order, with the page each heading is on (read by the checklist page). */
  readonly drawnSections: { number: number; title: string; page: number }[] = [];

  /** A heading numbered in order of appearance ("3. Title"), so omitted sections leave no gaps. */
  section(title: string, keepWith?: number): void {
    this.sections += 1;
    this.heading(`${this.sections}. ${title}`, keepWith);
    this.drawnSections.push({ number: this.sections, title, page: this.doc.getCurrentPageInfo().pageNumber });
  }

  /** A bold sub-heading, kept with about three lines (a table header and its first rows) of what follows. */
  subheading(text: string): void {
    this.ensure(24);
    this.y += 1;
    this.setFont(10.5, true);
    this.doc.text(text, this.left, this.y + 3.8);
    this.y += 6;
  }

  paragraph(
    text: string,
    options: { size?: number; bold?: boolean; indent?: number; gap?: number; color?: [number, number, number] } = {},
  ): void {
    const size = options.size ?? 9.5;
    const indent = options.indent ?? 0;
    this.setFont(size, options.bold ?? false);
    const lh = this.lineHeight(size);
    if (options.color) this.doc.setTextColor(...options.color);
    for (const para of text.split('\n')) {
      const lines: string[] = this.doc.splitTextToSize(para.length > 0 ? para : ' ', this.width - indent);
      for (const line of lines) {
        this.ensure(lh);
        this.doc.text(line, this.left + indent, this.y + lh * 0.78);
        this.y += lh;
      }
    }
    this.doc.setTextColor(0, 0, 0);
    this.y += options.gap ?? 1.5;
  }

  /** A bulleted list item with hanging indent. */
  bullet(text: string, size = 9.5): void {
    this.setFont(size);
    const lh = this.lineHeight(size);
    const lines: string[] = this.doc.splitTextToSize(text, this.width - 5);
    this.ensure(lh * Math.min(lines.length, 2));
    this.doc.text('\u2022', this.left + 1, this.y + lh * 0.78);
    for (const line of lines) {
      this.ensure(lh);
      this.doc.text(line, this.left + 5, this.y + lh * 0.78);
      this.y += lh;
    }
    this.y += 0.8;
  }

  /** The height in mm a heading takes on the page (its own space, not the lines it keeps with it). */
  readonly headingHeight = 12.5;

  /** The height in mm that `bullet` would take for each of these texts, without drawing them. */
  bulletsHeight(texts: readonly string[], size = 9.5): number {
    this.setFont(size);
    const lh = this.lineHeight(size);
    return texts.reduce((h, t) => h + (this.doc.splitTextToSize(t, this.width - 5) as string[]).length * lh + 0.8, 0);
  }

  /** Label/value rows in two columns; values wrap. */
  keyValues(rows: [string, string][], labelWidth = 48, size = 9.5): void {
    const lh = this.lineHeight(size);
    for (const [label, value] of rows) {
      this.setFont(size);
      const lines: string[] = this.doc.splitTextToSize(value, this.width - labelWidth);
      this.ensure(lh * (lines.length <= 8 ? lines.length : 3));
      this.setFont(size, true);
      this.doc.text(label, this.left, this.y + lh * 0.78);
      this.setFont(size);
      for (const line of lines) {
        this.ensure(lh);
        this.doc.text(line, this.left + labelWidth, this.y + lh * 0.78);
        this.y += lh;
      }
      this.y += 0.6;
    }
    this.y += 1.5;
  }

  /** A ruled table; cells wrap within their column; the header repeats on each new page. */
  table(columns: TableColumn[], rows: string[][], size = 8.5): void {
    const lh = this.lineHeight(size);
    const pad = 1.2;
    const drawHeader = (): void => {
      this.setFont(size, true);
      const headerLines = columns.map((c) => this.doc.splitTextToSize(c.header, c.width - 2 * pad) as string[]);
      const h = Math.max(...headerLines.map((l) => l.length)) * lh + 2 * pad;
      this.doc.setFillColor(232, 238, 246);
      this.doc.rect(this.left, this.y, this.tableWidth(columns), h, 'F');
      this.cells(columns, headerLines, lh, pad);
      this.y += h;
      this.rule(columns, 0.3);
    };
    this.ensure(lh * 3 + 4);
    drawHeader();
    this.setFont(size);
    for (const row of rows) {
      this.setFont(size);
      const cellLines = columns.map((c, i) => this.doc.splitTextToSize(row[i] ?? '', c.width - 2 * pad) as string[]);
      const h = Math.max(...cellLines.map((l) => l.length)) * lh + 2 * pad;
      if (this.y + h > this.bottom) {
        this.newPage();
        drawHeader();
        this.setFont(size);
      }
      this.cells(columns, cellLines, lh, pad);
      this.y += h;
      this.rule(columns, 0.1);
    }
    this.y += 3;
  }

  private tableWidth(columns: TableColumn[]): number {
    return columns.reduce((s, c) => s + c.width, 0);
  }

  private rule(columns: TableColumn[], width: number): void {
    this.doc.setDrawColor(150, 150, 150);
    this.doc.setLineWidth(width);
    this.doc.line(this.left, this.y, this.left + this.tableWidth(columns), this.y);
  }

  private cells(columns: TableColumn[], lines: string[][], lh: number, pad: number): void {
    let x = this.left;
    columns.forEach((c, i) => {
      lines[i].forEach((line, k) => {
        const ty = this.y + pad + lh * (k + 0.78);
        if (c.align === 'right') this.doc.text(line, x + c.width - pad, ty, { align: 'right' });
        else this.doc.text(line, x + pad, ty);
      });
      x += c.width;
    });
  }

  /** Writes "page i of n" and a running line on every page; call once at the end. */
  footer(left: string): void {
    const n = this.doc.getNumberOfPages();
    for (let i = 1; i <= n; i++) {
      this.doc.setPage(i);
      this.setFont(7.5);
      this.doc.setTextColor(90, 90, 90);
      this.doc.setDrawColor(180, 180, 180);
      this.doc.setLineWidth(0.2);
      this.doc.line(this.left, 285, this.right, 285);
      this.doc.text(left, this.left, 289);
      this.doc.text(`page ${i} of ${n}`, this.right, 289, { align: 'right' });
      this.doc.setTextColor(0, 0, 0);
    }
  }
}
