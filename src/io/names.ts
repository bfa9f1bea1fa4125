import { warning, type EngineWarning } from '../engine/core';

const MARKUP = /<\s*\/?\s*[a-z!][^>]*>|javascript:|on[a-z]+\s*=/i;

/**
 * Turns header cells into unique, non-blank column names, visibly: a blank name becomes "column_7"
 * (its 1-based position), a repeated name gets "_2", "_3"…, line breaks and surrounding spaces are removed.
 * Each change is reported. Markup-looking names are kept as text and reported.
 */
export class ColumnNamer {
  readonly names: string[] = [];
  readonly warnings: EngineWarning[] = [];
  private readonly used = new Set<string>();

  add(raw: string, position: number, fromHeader: boolean): string {
    let name = raw.replace(/[\r\n\t]+/g, ' ').trim();
    const col = `column ${position}`;
    if (fromHeader && name !== raw) {
      this.warnings.push(
        warning(
          'name-cleaned',
          `The name of ${col} had line breaks or surrounding spaces; it is now "${name}".`,
          'Nothing to do unless the name should differ; rename the header in the file if so.',
          [name],
        ),
      );
    }
    if (name === '') {
      name = this.unique(`column_${position}`);
      if (fromHeader) {
        this.warnings.push(
          warning(
            'blank-name',
            `Column ${position} has no name in the header row; it is called "${name}".`,
            'Type a name into the header cell (row 1) of the file if the column is needed.',
            [name],
          ),
        );
      }
    } else if (this.used.has(name)) {
      const first = name;
      name = this.unique(name);
      this.warnings.push(
        warning(
          'duplicate-name',
          `The name "${first}" appears more than once; ${col} is called "${name}".`,
          'Give each column its own name in the header row (row 1) so you can tell them apart.',
          [name],
        ),
      );
    }
    if (MARKUP.test(name)) {
      this.warnings.push(
        warning(
          'markup-name',
          `The name of ${col} looks like web-page markup or script ("${name.slice(0, 60)}"); ` +
            'it is treated as plain text.',
          'Check that this file is the spreadsheet you meant to open; rename the column if so.',
          [name],
        ),
      );
    }
    this.used.add(name);
    this.names.push(name);
    return name;
  }

  private unique(base: string): string {
    if (!this.used.has(base)) return base;
    let k = 2;
    while (this.used.has(`${base}_${k}`)) k++;
    return `${base}_${k}`;
  }
}
