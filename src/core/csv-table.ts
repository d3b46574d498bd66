// A small CSV reader (RFC 4180: commas, double-quoted cells with "" for a quote, CRLF or LF,
// line breaks inside quotes) that keeps the line on which each row starts, so that an error
// can name the row as a spreadsheet shows it (the header is row 1).
import { ArgumentError } from './errors.ts';

/** One row of cells and the line (from 1) it starts on. */
export interface CsvRow {
  line: number;
  cells: string[];
}

/** Rows of a CSV text; blank lines are skipped. Errors name `fileName` and the line. */
export function parseCsv(text: string, fileName: string): CsvRow[] {
  const rows: CsvRow[] = [];
  let k = text.charCodeAt(0) === 0xfeff ? 1 : 0; // a byte-order mark is not part of the first cell
  let line = 1;
  while (k < text.length) {
    const start = line;
    const cells: string[] = [];
    let cell = '';
    let quoted = false;
    let endOfRow = false;
    while (k < text.length && !endOfRow) {
      const c = text[k];
      if (quoted) {
        if (c === '"' && text[k + 1] === '"') {
          cell += '"';
          k += 2;
          continue;
        }
        if (c === '"') {
          quoted = false;
          k++;
          if (k < text.length && text[k] !== ',' && text[k] !== '\n' && text[k] !== '\r') {
            throw new ArgumentError(`${fileName} row ${start}: text after a closing quote (${JSON.stringify(text.slice(k, k + 10))}); put the whole cell in quotes and write a quote inside as ""`);
          }
          continue;
        }
        if (c === '\n') line++;
        cell += c;
        k++;
        continue;
      }
      if (c === '"' && cell.trim() === '') {
        quoted = true;
        cell = '';
        k++;
      } else if (c === ',') {
        cells.push(cell);
        cell = '';
        k++;
      } else if (c === '\r' || c === '\n') {
        k += c === '\r' && text[k + 1] === '\n' ? 2 : 1;
        line++;
        endOfRow = true;
      } else {
        cell += c;
        k++;
      }
    }
    if (quoted) throw new ArgumentError(`${fileName} row ${start}: a quoted cell is not closed before the end of the file`);
    cells.push(cell);
    if (cells.length === 1 && cells[0].trim() === '') continue;
    rows.push({ line: start, cells });
  }
  return rows;
}
