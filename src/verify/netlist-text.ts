// Text changes that turn the generated netlist and testbench into a verification run at one
// corner, without touching the emitters: the NPN model's gain, the supply value, the
// temperature, what is saved, and a 0 V source that measures the circuit's own supply current
// apart from the testbench's input drivers. Pure functions over SPICE text; each reports what it
// could not find instead of guessing.
import { spiceNumber, spiceParam } from "../emit/format.js";
import type { VerifyCorner } from "./corners.js";

/** Node the circuit's supply pin is moved to; the 0 V source between it and vcc measures the
 *  circuit's own current. */
export const DUT_SUPPLY_NODE = "vcc_dut";
export const DUT_SUPPLY_SOURCE = "VDUT";
/** Vector name of the circuit's supply current (ngspice sign: negative while delivering). */
export const DUT_SUPPLY_VECTOR = `i(${DUT_SUPPLY_SOURCE.toLowerCase()})`;

export interface TextResult {
  text: string;
  /** What the transformation expected and did not find (an empty list means it all applied). */
  problems: string[];
}

/** Logical SPICE lines: a card and its `+` continuation lines joined, with their line ranges. */
function logicalLines(lines: string[]): { start: number; end: number; text: string }[] {
  const out: { start: number; end: number; text: string }[] = [];
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i]!;
    if (/^\s*\+/.test(l) && out.length > 0) {
      const last = out[out.length - 1]!;
      last.text += " " + l.replace(/^\s*\+/, "");
      last.end = i;
    } else out.push({ start: i, end: i, text: l });
  }
  return out;
}

/**
 * Sets BF of the `.model <modelName> NPN(…)` card to `bf` and TNOM to 25 °C (the temperature the
 * sizing's gain figures refer to; ngspice's default is 27 °C), adding them when absent.
 */
export function withModelGain(netlist: string, modelName: string, bf: number): TextResult {
  const lines = netlist.split(/\r?\n/);
  const cards = logicalLines(lines);
  const head = new RegExp(`^\\s*\\.model\\s+${modelName.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}\\s+npn\\b`, "i");
  const card = cards.find((c) => head.test(c.text));
  if (!card) return { text: netlist, problems: [`no .model card for ${modelName} in the netlist`] };
  let text = card.text;
  const setParam = (name: string, value: string) => {
    const re = new RegExp(`(\\b${name}\\s*=\\s*)[^\\s)]+`, "i");
    if (re.test(text)) text = text.replace(re, `$1${value}`);
    else if (/\)\s*$/.test(text)) text = text.replace(/\)\s*$/, ` ${name}=${value})`);
    else text = `${text} ${name}=${value}`;
  };
  setParam("BF", spiceParam(bf));
  setParam("TNOM", "25");
  lines.splice(card.start, card.end - card.start + 1, text);
  return { text: lines.join("\n"), problems: [] };
}

export interface TestbenchChanges {
  supplyVolts: number;
  tempC: number;
  /** Vectors to save (replacing the testbench's own `.save` list). */
  save: string[];
}

/**
 * Prepares the generated testbench for one verification run: the supply source's value, a
 * `.temp` card, the circuit's supply pin moved behind a 0 V source (so its current is measured
 * without the input drivers'), one `.save` list, and no `.meas` cards (the samples are read from
 * the waveforms, so a run does not depend on them).
 */
export function prepareTestbench(testbench: string, c: TestbenchChanges): TextResult {
  const problems: string[] = [];
  const lines = testbench.split(/\r?\n/);
  const out: string[] = [];
  let sawSupply = false;
  let sawDut = false;
  let sawEnd = false;
  let inMeas = false;
  for (const line of lines) {
    if (inMeas && /^\s*\+/.test(line)) continue;
    inMeas = false;
    if (/^\s*\.meas(ure)?\b/i.test(line)) {
      inMeas = true;
      continue;
    }
    if (/^\s*\.save\b/i.test(line) || /^\s*\.temp\b/i.test(line)) continue;
    const supply = /^(\s*VCC\s+vcc\s+0\s+)(?:DC\s+)?\S+\s*$/i.exec(line);
    if (supply) {
      out.push(`${supply[1]}DC ${spiceNumber(c.supplyVolts, 8)}`);
      sawSupply = true;
      continue;
    }
    if (/^\s*XDUT\s/i.test(line)) {
      const tokens = line.trim().split(/\s+/);
      const k = tokens.lastIndexOf("vcc", tokens.length - 2);
      if (k > 0) {
        tokens[k] = DUT_SUPPLY_NODE;
        out.push(tokens.join(" "));
        out.push(`${DUT_SUPPLY_SOURCE} ${DUT_SUPPLY_NODE} vcc DC 0`);
        sawDut = true;
        continue;
      }
    }
    if (/^\s*\.end\s*$/i.test(line) && !sawEnd) {
      out.push(`.temp ${c.tempC}`);
      out.push(`.save ${c.save.join(" ")}`);
      out.push(line);
      sawEnd = true;
      continue;
    }
    out.push(line);
  }
  if (!sawSupply) problems.push("no 'VCC vcc 0 DC …' supply source in the testbench");
  if (!sawDut) problems.push("no XDUT line with a vcc port in the testbench");
  if (!sawEnd) problems.push("no .end card in the testbench");
  return { text: out.join("\n"), problems };
}

/** The netlist and testbench of one corner run. */
export function cornerTexts(netlist: string, testbench: string, corner: VerifyCorner, npnModel: string, save: string[]): { netlist: string; testbench: string; problems: string[] } {
  const problems: string[] = [];
  let cir = netlist;
  if (corner.bf !== undefined) {
    const m = withModelGain(netlist, npnModel, corner.bf);
    cir = m.text;
    problems.push(...m.problems);
  }
  const tb = prepareTestbench(testbench, { supplyVolts: corner.supplyVolts, tempC: corner.tempC, save });
  problems.push(...tb.problems);
  return { netlist: cir, testbench: tb.text, problems };
}

/** The `.include "file"` names of a testbench, in order. */
export function includedFiles(testbench: string): string[] {
  const out: string[] = [];
  for (const l of testbench.split(/\r?\n/)) {
    const m = /^\s*\.inc(?:lude)?\s+(?:"([^"]*)"|'([^']*)'|(\S+))\s*$/i.exec(l);
    if (m) out.push(m[1] ?? m[2] ?? m[3]!);
  }
  return out;
}
