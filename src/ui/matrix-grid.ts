/**
 * The matrix grid: one text input per entry, in a `role="grid"` table, used by the state editor (a
 * density matrix or a ket column) and the channel editor (Kraus operators, a Choi matrix).
 *
 * Keyboard: arrows move between cells (left/right only when the caret is at the text's edge, so that
 * editing inside an entry still works), Tab/Shift+Tab follow the reading order (the browser's own), Enter
 * moves down (Shift+Enter up), Escape puts back what the cell held when it got focus. Typing reports
 * every edit at once (`onEdit`); a paste of several entries (numpy, spreadsheet, CSV) goes to `onPaste`.
 * Cells can be marked (an offending entry, an unreadable one) with a title saying why.
 *
 * Deliberately not here: what entries mean (the engine reads them), any check or repair.
 * Cost: one input per entry; rebuilt only when the shape changes.
 */
import { el } from './dom.js';
import { entryText, parsePastedMatrix, toEntry, type Entry } from './matrix-text.js';

export type CellMark = 'offending' | 'error' | 'partner';

export interface MatrixGridOptions {
  /** Accessible name of the grid ("density matrix", "Kraus operator 1"). */
  label: string;
  /** Names of the rows and columns (basis labels such as "|01⟩"); default the indices. */
  rowNames?: string[];
  colNames?: string[];
  onEdit?: (row: number, col: number) => void;
  /** A multi-entry paste at (row, col); return true when handled. */
  onPaste?: (rows: string[][], row: number, col: number) => void;
  /** A paste that could not be read. */
  onPasteError?: (message: string) => void;
}

export class MatrixGrid {
  readonly element: HTMLElement;
  private table: HTMLTableElement;
  private inputs: HTMLInputElement[][] = [];
  private held = '';
  private marks: { input: HTMLInputElement; cls: string }[] = [];

  constructor(private options: MatrixGridOptions, entries: Entry[][] = [[0]]) {
    this.table = el('table', { class: 'rs-grid__table', role: 'grid', 'aria-label': options.label });
    this.element = el('div', { class: 'rs-grid' }, [this.table]);
    this.entries = entries;
  }

  get rows(): number {
    return this.inputs.length;
  }

  get cols(): number {
    return this.inputs[0]?.length ?? 0;
  }

  /** The entries as the protocol takes them (numbers, or expression strings; "" stays "" for the engine to refuse). */
  get entries(): Entry[][] {
    return this.inputs.map((row) => row.map((input) => toEntry(input.value)));
  }

  set entries(rows: Entry[][]) {
    const r = rows.length;
    const c = rows[0]?.length ?? 0;
    if (r !== this.rows || c !== this.cols) this.build(r, c);
    rows.forEach((row, i) => row.forEach((x, j) => {
      const t = entryText(x);
      if (this.inputs[i][j].value !== t) this.inputs[i][j].value = t;
    }));
  }

  setNames(rowNames?: string[], colNames?: string[]): void {
    this.options.rowNames = rowNames;
    this.options.colNames = colNames;
    const entries = this.entries;
    this.build(this.rows, this.cols);
    this.entries = entries;
  }

  /** Resizes to r × c, keeping the entries that still fit and filling new ones with 0. */
  resize(r: number, c: number): void {
    const old = this.entries;
    const next = Array.from({ length: r }, (_, i) => Array.from({ length: c }, (_, j) => old[i]?.[j] ?? 0));
    this.build(r, c);
    this.entries = next;
  }

  input(row: number, col: number): HTMLInputElement | undefined {
    return this.inputs[row]?.[col];
  }

  focusCell(row: number, col: number): void {
    const input = this.input(row, col);
    if (input) {
      input.focus();
      input.select();
    }
  }

  /** Marks cells (clearing earlier marks): why they are marked goes into their title for people and screen readers. */
  mark(cells: { row: number; col: number; kind: CellMark; why: string }[]): void {
    for (const { input, cls } of this.marks) {
      input.classList.remove(cls);
      input.removeAttribute('title');
      input.removeAttribute('aria-invalid');
      input.removeAttribute('aria-description');
    }
    this.marks = [];
    for (const c of cells) {
      const input = this.input(c.row, c.col);
      if (!input) continue;
      const cls = `rs-cell--${c.kind}`;
      input.classList.add(cls);
      input.title = c.why;
      input.setAttribute('aria-description', c.why);
      if (c.kind === 'error') input.setAttribute('aria-invalid', 'true');
      this.marks.push({ input, cls });
    }
  }

  private build(r: number, c: number): void {
    const { rowNames, colNames } = this.options;
    this.inputs = [];
    const head = el('tr', {}, [el('th', { class: 'rs-grid__corner', 'aria-hidden': 'true' })]);
    for (let j = 0; j < c; j++) head.append(el('th', { class: 'rs-grid__colname', scope: 'col' }, [colNames?.[j] ?? String(j)]));
    const body: HTMLTableRowElement[] = [];
    for (let i = 0; i < r; i++) {
      const tr = el('tr', {}, [el('th', { class: 'rs-grid__rowname', scope: 'row' }, [rowNames?.[i] ?? String(i)])]);
      const row: HTMLInputElement[] = [];
      for (let j = 0; j < c; j++) {
        const input = el('input', {
          class: 'rs-cell', type: 'text', inputmode: 'decimal', spellcheck: 'false', autocomplete: 'off',
          'aria-label': `${this.options.label}, row ${rowNames?.[i] ?? i}, column ${colNames?.[j] ?? j}`,
          'data-row': i, 'data-col': j,
        });
        this.wire(input, i, j);
        row.push(input);
        tr.append(el('td', { role: 'gridcell' }, [input]));
      }
      this.inputs.push(row);
      body.push(tr);
    }
    this.table.replaceChildren(el('thead', {}, [head]), el('tbody', {}, body));
    this.marks = [];
  }

  private wire(input: HTMLInputElement, i: number, j: number): void {
    input.addEventListener('focus', () => {
      this.held = input.value;
    });
    input.addEventListener('input', () => this.options.onEdit?.(i, j));
    input.addEventListener('keydown', (e) => {
      const atStart = input.selectionStart === 0 && input.selectionEnd === 0;
      const atEnd = input.selectionStart === input.value.length && input.selectionEnd === input.value.length;
      let to: [number, number] | null = null;
      switch (e.key) {
        case 'ArrowUp': to = [i - 1, j]; break;
        case 'ArrowDown': to = [i + 1, j]; break;
        case 'ArrowLeft': if (atStart || input.selectionStart === null) to = [i, j - 1]; break;
        case 'ArrowRight': if (atEnd || input.selectionStart === null) to = [i, j + 1]; break;
        case 'Enter': to = e.shiftKey ? [i - 1, j] : [i + 1, j]; break;
        case 'Escape':
          if (input.value !== this.held) {
            input.value = this.held;
            this.options.onEdit?.(i, j);
          }
          input.select();
          e.preventDefault();
          return;
        default: return;
      }
      if (!to) return;
      e.preventDefault();
      const [r, c] = to;
      if (r >= 0 && r < this.rows && c >= 0 && c < this.cols) this.focusCell(r, c);
    });
    input.addEventListener('paste', (e) => {
      const text = e.clipboardData?.getData('text/plain') ?? '';
      // One entry (no separator between tokens): the browser's own paste into the cell.
      if (!/[\n\t,;[\]]/.test(text.trim()) && !/\S\s+\S/.test(text.trim())) return;
      e.preventDefault();
      const parsed = parsePastedMatrix(text);
      if ('error' in parsed) this.options.onPasteError?.(parsed.error);
      else this.options.onPaste?.(parsed.rows, i, j);
    });
  }
}
