/*
 * Reads masses pasted from a balance or a spreadsheet: one mass per line ("512.3", "512,3 mg",
 * "0.5123 g", "N  + 0.5123 g" as many balances print), or a CSV/TSV with a header naming a mass
 * column. Decimal commas are accepted; a CSV whose numbers use decimal commas must then use ";" or a
 * tab between columns. Everything comes out in milligrams, with a message per line that could not
 * be read so the operator can fix exactly that line.
 */

export type MassUnit = 'mg' | 'g';

export interface LineError {
  line: number;
  text: string;
  message: string;
}

export interface ParsedMasses {
  massesMg: number[];
  errors: LineError[];
  /** Notes that change how values were read, e.g. a unit that was assumed. */
  notes: string[];
}

/** Below this, an unlabelled value cannot be a capsule fill in mg; it is read as grams. */
const gramsBelow = 3;

const valuePattern = /^(?:[A-Za-z]{1,4}[\s,]+)*([+-]?)\s*(\d[\d.,]*|[.,]\d+)\s*(mg|g)?$/i;

function readNumber(raw: string): number | string {
  if (raw.includes(',') && raw.includes('.')) return 'uses both "," and "." — write the number with one decimal separator';
  const value = Number(raw.replace(',', '.'));
  return Number.isNaN(value) ? `"${raw}" has more than one decimal separator` : value;
}

interface ReadValue {
  value: number;
  unit: MassUnit | null;
}

function readValue(cell: string): ReadValue | string {
  const text = cell.trim();
  const match = valuePattern.exec(text);
  if (!match) return `"${text}" is not a mass (expected a number, optionally followed by mg or g)`;
  const [, sign, digits, unit] = match;
  const value = readNumber(digits!);
  if (typeof value === 'string') return value;
  if (sign === '-' || value <= 0) return 'a mass must be above zero';
  return { value, unit: unit ? (unit.toLowerCase() as MassUnit) : null };
}

const massHeader = /mass|weight|gross|net|fill|value|\bmg\b|\bg\b|reading/i;

function splitRow(line: string, delimiter: string): string[] {
  return line.split(delimiter).map((c) => c.trim().replace(/^"(.*)"$/, '$1'));
}

function headerUnit(name: string): MassUnit | null {
  if (/[([\s_-]g[)\]]?$/i.test(name) || /^g$/i.test(name)) return 'g';
  if (/mg/i.test(name)) return 'mg';
  return null;
}

export function parseMasses(text: string, options: { defaultUnit?: MassUnit } = {}): ParsedMasses {
  const lines = text.split(/\r\n|\r|\n/).map((t, i) => ({ line: i + 1, text: t }));
  const filled = lines.filter((l) => l.text.trim() !== '');
  const errors: LineError[] = [];
  const notes: string[] = [];
  const read: { line: number; text: string; value: ReadValue }[] = [];

  const first = filled[0];
  const delimiter = first ? (first.text.includes('\t') ? '\t' : first.text.includes(';') ? ';' : ',') : ',';
  const isCsv = first !== undefined && /[A-Za-z]{2,}/.test(first.text) && first.text.includes(delimiter) && !readValueOk(first.text);

  let column = 0;
  let columnUnit: MassUnit | null = null;
  let rows = filled;
  if (isCsv) {
    const header = splitRow(first.text, delimiter);
    const found = header.findIndex((h) => massHeader.test(h));
    if (found === -1) {
      errors.push({ line: first.line, text: first.text, message: 'no column is named for the mass (e.g. "mass", "weight", "net mg")' });
      return { massesMg: [], errors, notes };
    }
    column = found;
    columnUnit = headerUnit(header[found]!);
    rows = filled.slice(1);
    notes.push(`Read column "${header[found]}".`);
  }

  for (const row of rows) {
    const cell = isCsv ? splitRow(row.text, delimiter)[column] : row.text;
    if (cell === undefined || cell === '') {
      errors.push({ line: row.line, text: row.text, message: 'has no value in the mass column' });
      continue;
    }
    const value = readValue(cell);
    if (typeof value === 'string') errors.push({ line: row.line, text: row.text, message: value });
    else read.push({ line: row.line, text: row.text, value: { value: value.value, unit: value.unit ?? columnUnit } });
  }

  let assumed: MassUnit = options.defaultUnit ?? 'mg';
  const unlabelled = read.filter((r) => r.value.unit === null);
  if (!options.defaultUnit && unlabelled.length > 0 && unlabelled.every((r) => r.value.value < gramsBelow)) {
    assumed = 'g';
    notes.push(`No unit given and every value is below ${gramsBelow}: read as grams.`);
  }
  const massesMg = read.map((r) => {
    const unit = r.value.unit ?? assumed;
    // Rounded to a micro-gram so 0.5123 g reads as 512.3 mg, not 512.30000000000001.
    return unit === 'g' ? Math.round(r.value.value * 1_000_000) / 1000 : r.value.value;
  });
  return { massesMg, errors, notes };
}

function readValueOk(text: string): boolean {
  return typeof readValue(text) !== 'string';
}

export function formatLineError(e: LineError): string {
  return `Line ${e.line}: ${e.message}.`;
}
