/**
 * A problem found in an input file: where it is and what is wrong.
 * `line` and `column` are 1-based; `column` is the field number (1 = first
 * field of the record), not a character offset. Problems about the whole file
 * use line 1, column 1.
 */
export interface Problem {
  file: string;
  line: number;
  column: number;
  message: string;
}

/** "FILE:LINE:COLUMN: reason" — the one-line form shown to users and printed by the CLI. */
export function formatProblem(p: Problem): string {
  return `${p.file}:${p.line}:${p.column}: ${p.message}`;
}

/** Default cap on the number of problems kept per list. */
const MAX_PROBLEMS = 200;

/**
 * Collects problems up to a cap; anything past the cap is only counted, and
 * `list()` ends with a final "and N more problems" entry.
 */
export class ProblemCollector {
  private readonly items: Problem[] = [];
  private extra = 0;

  constructor(
    readonly file: string,
    private readonly cap: number = MAX_PROBLEMS,
    private readonly noun: string = 'problem',
  ) {}

  add(line: number, column: number, message: string): void {
    if (this.items.length < this.cap) {
      this.items.push({ file: this.file, line: Math.max(1, line), column: Math.max(1, column), message });
    } else {
      this.extra++;
    }
  }

  get count(): number {
    return this.items.length + this.extra;
  }

  /** Problems in file order (line, then field), with the "and N more" entry last. */
  list(): Problem[] {
    const sorted = this.items.slice().sort((a, b) => a.line - b.line || a.column - b.column);
    if (this.extra === 0) return sorted;
    const last = sorted[sorted.length - 1];
    return [
      ...sorted,
      {
        file: this.file,
        line: last ? last.line : 1,
        column: 1,
        message: `and ${this.extra} more ${this.noun}${this.extra === 1 ? '' : 's'} not shown`,
      },
    ];
  }
}
