// Reading ngspice's console text: its messages (errors, warnings, notes) and `.meas` results.
//
// ngspice writes messages to stderr, one line at a time, with continuation lines indented or
// following a heading such as "Error on line 4 or its substitute:". Runs of the same message
// (convergence aids retry dozens of times) are folded into one with a count.

export interface EngineMessages {
  errors: string[];
  warnings: string[];
  /** Progress and informational notes ("Note: Starting dynamic gmin stepping"). */
  notes: string[];
}

/** A line that starts a new message rather than continuing the previous one. */
const MESSAGE_START =
  /^(error|warning|note|fatal|doanalyses|run simulation|trying gmin|using sparse|simulation interrupted)\b/i;
/** Where ngspice writes a message in the middle of a line ("Trying gmin = 1E-3 Error: ..."). */
const MID_LINE_START = /\s+(?=(?:Error|Warning|Note)\s*:)/;
const NOTE_START = /^(note|trying gmin|using sparse)\b/i;
const WARNING_START = /^warning\b/i;
const ERROR_WORDS =
  /error|fail|abort|fatal|could not|cannot|can't|too small|singular|not parsed|no such|unknown|undefined|out of interval|not found/i;

function messageLines(input: string | readonly string[]): string[] {
  const text = typeof input === "string" ? input : input.join("\n");
  return text.split(/\r?\n/).map((l) => l.replace(/\s+$/, ""));
}

/** Splits ngspice's stderr text (or the lines the embedded engine collected) into messages. */
export function classifyMessages(input: string | readonly string[]): EngineMessages {
  const groups: string[][] = [];
  let current: string[] | undefined;
  for (const rawLine of messageLines(input)) {
    if (rawLine.trim() === "") {
      current = undefined;
      continue;
    }
    const pieces = /^\s/.test(rawLine) ? [rawLine] : rawLine.split(MID_LINE_START);
    for (const piece of pieces) {
      if (piece.trim() === "") continue;
      const startsMessage = !/^\s/.test(piece) && MESSAGE_START.test(piece);
      // "Simulation interrupted due to error!" is ngspice's indented tail of the message above.
      if (current !== undefined && (/^\s/.test(piece) || !startsMessage)) {
        current.push(piece.trim());
      } else {
        current = [piece.trim()];
        groups.push(current);
      }
    }
  }

  const result: EngineMessages = { errors: [], warnings: [], notes: [] };
  const seen = new Map<string, { list: string[]; index: number; count: number }>();
  for (const group of groups) {
    const text = group.join("\n  ");
    const first = group[0]!;
    const list = WARNING_START.test(first)
      ? result.warnings
      : NOTE_START.test(first)
        ? result.notes
        : ERROR_WORDS.test(text)
          ? result.errors
          : result.notes;
    const prior = seen.get(text);
    if (prior) {
      prior.count++;
      prior.list[prior.index] = `${text} (${prior.count} times)`;
      continue;
    }
    seen.set(text, { list, index: list.length, count: 1 });
    list.push(text);
  }
  return result;
}

const MEASURE_HEADING = /^\s*Measurements for /;
const MEASURE_RESULT =
  /^([a-z_][\w.$-]*)\s*=\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)(?=\s|$)/i;

/**
 * `.meas` results as ngspice prints them after a "Measurements for … Analysis" heading:
 * `name = value [targ= … trig= …]`. Names are lower-cased, as ngspice prints them. Failed
 * measurements print nothing here (their error goes to stderr).
 */
export function parseMeasures(log: string): Map<string, number> {
  const measures = new Map<string, number>();
  let inBlock = false;
  for (const line of log.split(/\r?\n/)) {
    if (MEASURE_HEADING.test(line)) {
      inBlock = true;
      continue;
    }
    if (!inBlock) continue;
    const m = MEASURE_RESULT.exec(line);
    if (m) measures.set(m[1]!.toLowerCase(), Number(m[2]));
  }
  return measures;
}
