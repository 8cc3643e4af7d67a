// What a verification says, for people (a terminal summary taken in at a glance, and a Markdown
// report) and for programs (a JSON view). Pure: a VerifyResult in, text out.
import { eng } from "../emit/format.js";
import type { CornerResult, VerifyResult } from "./verify.js";

/** Outputs drawn as columns of the pass/fail table; more are summarized per corner. */
export const MATRIX_SIGNALS_MAX = 8;

function volts(x: number): string {
  return Number.isFinite(x) ? `${x.toFixed(3)} V` : "–";
}

function time(x: number | undefined): string {
  return x !== undefined && Number.isFinite(x) ? eng(x, "s") : "–";
}

function table(rows: string[][], indent = "  "): string[] {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, [...c].length)));
  return rows.map((r) => indent + r.map((c, i) => (i === r.length - 1 ? c : c + " ".repeat(widths[i]! - [...c].length))).join("  ").trimEnd());
}

/** "ok", "FAIL" (disagrees with the logic) or "margin" (noise margin below the required). */
export function signalVerdict(c: CornerResult, signal: string): "ok" | "FAIL" | "margin" | "error" {
  if (c.errors.length) return "error";
  if (c.comparison.failures.some((f) => f.output === signal)) return "FAIL";
  if (c.violations.some((v) => v.signal === signal)) return "margin";
  return "ok";
}

interface Worst {
  value: number;
  signal: string;
  corner: string;
}

function worstMargins(r: VerifyResult): { low?: Worst; high?: Worst; highClamped?: Worst } {
  const out: { low?: Worst; high?: Worst; highClamped?: Worst } = {};
  for (const c of r.corners)
    for (const s of c.signals) {
      const nl = s.levels.noiseMarginLowVolts;
      const nh = s.levels.noiseMarginHighVolts;
      if (Number.isFinite(nl) && (!out.low || nl < out.low.value)) out.low = { value: nl, signal: s.name, corner: c.corner.label };
      if (Number.isFinite(nh)) {
        const key = s.highClamped ? "highClamped" : "high";
        const w = out[key];
        if (!w || nh < w.value) out[key] = { value: nh, signal: s.name, corner: c.corner.label };
      }
    }
  return out;
}

/** Per signal, the worst levels and delays over all corners. */
function worstPerSignal(r: VerifyResult) {
  const names = r.corners[0]?.signals.map((s) => ({ name: s.name, kind: s.kind })) ?? [];
  return names.map(({ name, kind }) => {
    let lowMax = -Infinity;
    let highMin = Infinity;
    let nmL = Infinity;
    let nmH = Infinity;
    let tphl: number | undefined;
    let tplh: number | undefined;
    let clamped = false;
    let vil = Infinity;
    let vih = -Infinity;
    let analytic: CornerResult["signals"][number]["analytic"];
    for (const c of r.corners) {
      const s = c.signals.find((x) => x.name === name);
      if (!s) continue;
      clamped = s.highClamped;
      analytic = s.analytic;
      vil = Math.min(vil, s.vilVolts);
      vih = Math.max(vih, s.vihVolts);
      if (Number.isFinite(s.levels.lowMaxVolts)) lowMax = Math.max(lowMax, s.levels.lowMaxVolts);
      if (Number.isFinite(s.levels.highMinVolts)) highMin = Math.min(highMin, s.levels.highMinVolts);
      if (Number.isFinite(s.levels.noiseMarginLowVolts)) nmL = Math.min(nmL, s.levels.noiseMarginLowVolts);
      if (Number.isFinite(s.levels.noiseMarginHighVolts)) nmH = Math.min(nmH, s.levels.noiseMarginHighVolts);
      if (s.delays.tPHLMaxSeconds !== undefined) tphl = Math.max(tphl ?? 0, s.delays.tPHLMaxSeconds);
      if (s.delays.tPLHMaxSeconds !== undefined) tplh = Math.max(tplh ?? 0, s.delays.tPLHMaxSeconds);
    }
    return { name, kind, lowMax, highMin, nmL, nmH, tphl, tplh, clamped, analytic, vil, vih };
  });
}

/** The terminal summary. `written` are the files' paths as the user should see them. */
export function renderSummary(r: VerifyResult, written: readonly string[] = [], opts: { decouplingAdded?: boolean } = {}): string {
  const lines: string[] = [];
  const n = r.corners.length;
  lines.push(`${r.design}: ${r.pass ? "PASS" : "FAIL"} — simulated in ${r.simulator} at ${n} condition${n === 1 ? "" : "s"}${n > 1 ? " (nominal and every corner)" : " (nominal; --corners adds the corners)"}, in ${eng(r.elapsedMs / 1000, "s")}`);
  if (r.coverage) lines.push(`  vectors: ${r.coverage.text}`);
  if (r.statesCompared.length) lines.push(`  state signals compared as well: ${r.statesCompared.join(", ")}`);
  lines.push("");

  // Pass/fail per output and corner.
  const sigNames = r.corners[0]?.signals.map((s) => s.name) ?? [];
  if (sigNames.length <= MATRIX_SIGNALS_MAX) {
    const rows: string[][] = [["condition", ...sigNames, "compared"]];
    for (const c of r.corners) rows.push([c.corner.label, ...sigNames.map((s) => signalVerdict(c, s)), `${c.comparison.compared} samples`]);
    lines.push(...table(rows));
  } else {
    const rows: string[][] = [["condition", "verdict", "compared"]];
    for (const c of r.corners) {
      const bad = sigNames.filter((s) => signalVerdict(c, s) !== "ok");
      rows.push([c.corner.label, c.errors.length ? `error: ${c.errors[0]}` : bad.length ? `FAIL: ${bad.slice(0, 6).join(", ")}${bad.length > 6 ? ` and ${bad.length - 6} more` : ""}` : `all ${sigNames.length} ok`, `${c.comparison.compared} samples`]);
    }
    lines.push(...table(rows));
  }
  lines.push("  (ok: every sample reads as the logic says with the margins met; FAIL: a sample disagrees; margin: noise margin below the required)");
  lines.push("");

  // Margins and delays.
  const w = worstMargins(r);
  lines.push(`  worst noise margins seen (required ${eng(r.requiredMarginVolts, "V")}):`);
  if (w.low) lines.push(`    low state  ${volts(w.low.value)}  ${w.low.signal}, ${w.low.corner}`);
  if (w.high) lines.push(`    high state ${volts(w.high.value)}  ${w.high.signal}, ${w.high.corner}`);
  if (w.highClamped) lines.push(`    high state of nets clamped by diode-OR inputs ${volts(w.highClamped.value)}  ${w.highClamped.signal}, ${w.highClamped.corner} (their margin is a current margin; shown, not judged)`);
  const per = worstPerSignal(r).filter((p) => p.kind === "output");
  if (per.length) {
    lines.push("");
    const rows: string[][] = [["output", "V_OL max", "V_OH min", "t_PHL max", "t_PLH max"]];
    for (const p of per.slice(0, 40)) rows.push([p.name, volts(p.lowMax), volts(p.highMin) + (p.clamped ? " (clamped)" : ""), time(p.tphl), time(p.tplh)]);
    lines.push(...table(rows));
    if (per.length > 40) lines.push(`  … and ${per.length - 40} more outputs (see the report)`);
  }
  if (r.slowest) {
    const s = r.slowest;
    lines.push("");
    lines.push(
      `  slowest path: ${s.fromInput} → ${s.output}, ${s.edge === "fall" ? "t_PHL" : "t_PLH"} ${eng(s.delaySeconds, "s")} at ${s.corner}` +
        (r.pathEstimateSeconds !== undefined ? ` (the sizing estimated ${eng(r.pathEstimateSeconds, "s")} for the longest path)` : ""),
    );
  }
  const nom = r.corners[0];
  if (nom && Number.isFinite(nom.supply.averageWatts)) {
    const spike = largestSpike(r);
    lines.push(
      `  supply: ${eng(nom.supply.averageWatts, "W")} average (${eng(nom.supply.averageAmps, "A")}) at ${nom.corner.label}; peak ${eng(Math.max(...r.corners.map((c) => c.supply.peakAmps).filter(Number.isFinite)), "A")}` +
        (spike ? `; largest switching spike ${eng(spike.excessAmps, "A")} above the settled current (${eng(spike.chargeCoulombs, "C")}), ${spike.corner}` : ""),
    );
  }
  if (r.decoupling) {
    const d = r.decoupling;
    lines.push(`  decoupling: ${d.count} × ${eng(d.valueFarads, "F")} ceramic, ${d.voltageRatingVolts} V, one beside each group of cells (${d.groups.slice(0, 4).join(", ")}${d.groups.length > 4 ? ", …" : ""})${opts.decouplingAdded ? ", added to the parts list" : "; --decoupling adds them to the parts list"}; the verification report says how the value is derived`);
  }
  for (const note of r.notes) lines.push(`  note: ${note}`);
  if (written.length) {
    lines.push("");
    for (const f of written) lines.push(`  wrote ${f}`);
  }
  return lines.join("\n") + "\n";
}

function largestSpike(r: VerifyResult) {
  let best: { excessAmps: number; chargeCoulombs: number; corner: string; step: number } | undefined;
  for (const c of r.corners) for (const s of c.supply.spikes) if (!best || s.excessAmps > best.excessAmps) best = { excessAmps: s.excessAmps, chargeCoulombs: s.chargeCoulombs, corner: c.corner.label, step: s.step };
  return best;
}

/** The JSON view for programs (`--json` and x.verify.json). Non-finite numbers become null. */
export function verifyJson(r: VerifyResult, tool: { name: string; version: string }): object {
  const fin = (x: number | undefined) => (x !== undefined && Number.isFinite(x) ? x : null);
  return {
    generator: { name: tool.name, version: tool.version, note: `generated by ${tool.name} ${tool.version}` },
    design: r.design,
    simulator: r.simulator,
    pass: r.pass,
    coverage: r.coverage ?? null,
    stepSeconds: fin(r.stepSeconds),
    requiredNoiseMarginVolts: r.requiredMarginVolts,
    statesCompared: r.statesCompared,
    corners: r.corners.map((c) => ({
      ...c.corner,
      pass: c.pass,
      errors: c.errors,
      compared: c.comparison.compared,
      skipped: c.comparison.skipped,
      failureCount: c.comparison.failures.length,
      failures: c.comparison.failures.slice(0, 20).map((f) => ({ step: f.step, signal: f.output, kind: f.kind, timeSeconds: f.timeSeconds, volts: f.volts, expected: f.expected, read: f.read })),
      marginViolations: c.violations,
      signals: c.signals.map((s) => ({
        name: s.name,
        kind: s.kind,
        node: s.node,
        vilVolts: s.vilVolts,
        vihVolts: s.vihVolts,
        highClamped: s.highClamped,
        lowMaxVolts: fin(s.levels.lowMaxVolts),
        lowTypVolts: fin(s.levels.lowTypVolts),
        highMinVolts: fin(s.levels.highMinVolts),
        highTypVolts: fin(s.levels.highTypVolts),
        noiseMarginLowVolts: fin(s.levels.noiseMarginLowVolts),
        noiseMarginHighVolts: fin(s.levels.noiseMarginHighVolts),
        tPHLMaxSeconds: fin(s.delays.tPHLMaxSeconds),
        tPLHMaxSeconds: fin(s.delays.tPLHMaxSeconds),
        tPHLMeanSeconds: fin(s.delays.tPHLMeanSeconds),
        tPLHMeanSeconds: fin(s.delays.tPLHMeanSeconds),
        engine: s.analytic ?? null,
      })),
      slowest: c.slowest ?? null,
      supply: {
        averageWatts: fin(c.supply.averageWatts),
        averageAmps: fin(c.supply.averageAmps),
        peakAmps: fin(c.supply.peakAmps),
        staticMinAmps: fin(c.supply.staticMinAmps),
        staticMaxAmps: fin(c.supply.staticMaxAmps),
        largestSpikes: [...c.supply.spikes].sort((a, b) => b.excessAmps - a.excessAmps).slice(0, 5),
      },
      elapsedMs: c.elapsedMs,
    })),
    transfer: r.transfer.map((t) => ({
      cellType: t.cellType,
      load: t.loadText,
      engine: t.engine,
      corners: t.curves.map((c) => ({ corner: c.corner, points: c.points ?? null, samples: c.vinVolts.length })),
      errors: t.errors,
    })),
    slowest: r.slowest ?? null,
    pathEstimateSeconds: fin(r.pathEstimateSeconds),
    decoupling: r.decoupling ?? null,
    notes: r.notes,
    files: r.files.map((f) => ({ name: f.name, what: f.what })),
    diagnostics: r.diagnostics.map((d) => ({ code: d.code, severity: d.severity, message: d.message })),
    elapsedMs: r.elapsedMs,
  };
}

/** The verification report (x.verify.md). */
export function renderVerifyReport(r: VerifyResult, tool: { name: string; version: string }): string {
  const L: string[] = [];
  L.push(`<!-- ${r.design}: verification report generated by ${tool.name} ${tool.version} -->`);
  L.push(`# Verification: ${r.design}`);
  L.push("");
  L.push(`**${r.pass ? "PASS" : "FAIL"}.** Simulated in ${r.simulator} at ${r.corners.length} condition${r.corners.length === 1 ? "" : "s"}; every sampled output${r.statesCompared.length ? " and state signal" : ""} compared with the logic's own step-by-step simulation.`);
  L.push("");
  if (r.coverage) L.push(`Vectors: ${r.coverage.text}.`, "");
  L.push("## Conditions");
  L.push("");
  L.push("Supply min/max and temperature extremes are the corners the sizing checked; \"slow\" and \"fast\" set the transistor model's BF to the sizing's gain limits (β at 25 °C; the model's XTB scales it with temperature, TNOM 25 °C).");
  L.push("");
  L.push("| Condition | Verdict | Samples compared | Failures | Margin violations | Run time |");
  L.push("|---|---|--:|--:|--:|--:|");
  for (const c of r.corners) L.push(`| ${c.corner.label} | ${c.errors.length ? "error" : c.pass ? "pass" : "FAIL"} | ${c.comparison.compared} | ${c.comparison.failures.length} | ${c.violations.length} | ${eng(c.elapsedMs / 1000, "s")} |`);
  L.push("");
  L.push("## Levels, margins and delays (worst over the conditions)");
  L.push("");
  L.push(`Each net is read with the input thresholds of the cells it drives, as measured on their transfer curves at the same condition (unity-gain points); where no curve was measured, with the sizing's worst-case figures. The table gives the strictest over the conditions. Noise margins: V_IL − highest low level, lowest high level − V_IH; required ${eng(r.requiredMarginVolts, "V")}. Delays are measured between the 50 % points of the input that changed and of the output, to the output's last crossing before the sample.`);
  L.push("");
  L.push("| Signal | V_IL / V_IH | V_OL max | V_OH min | Engine V_OL / V_OH (worst) | NM low | NM high | t_PHL max | t_PLH max |");
  L.push("|---|---|--:|--:|---|--:|--:|--:|--:|");
  for (const p of worstPerSignal(r)) {
    L.push(
      `| ${p.name}${p.kind === "state" ? " (state)" : ""} | ${volts(p.vil)} / ${volts(p.vih)} | ${volts(p.lowMax)} | ${volts(p.highMin)}${p.clamped ? " (clamped)" : ""} | ${p.analytic ? `${volts(p.analytic.vOLWorstVolts)} / ${volts(p.analytic.vOHWorstVolts)} (${p.analytic.cell})` : "–"} | ${volts(p.nmL)} | ${volts(p.nmH)}${p.clamped ? "*" : ""} | ${time(p.tphl)} | ${time(p.tplh)} |`,
    );
  }
  L.push("");
  L.push("\\* The net drives diode-OR inputs, which clamp it when high; its high-state margin is the sizing's current margin, so the voltage figure is shown and not judged.");
  L.push("");
  if (r.slowest) {
    L.push(`Slowest path: ${r.slowest.fromInput} → ${r.slowest.output}, ${r.slowest.edge === "fall" ? "t_PHL" : "t_PLH"} ${eng(r.slowest.delaySeconds, "s")} at step ${r.slowest.step}, ${r.slowest.corner}${r.pathEstimateSeconds !== undefined ? `; the sizing's estimate of the longest path is ${eng(r.pathEstimateSeconds, "s")}` : ""}.`);
    L.push("");
  }
  L.push("## Supply");
  L.push("");
  L.push("The circuit's own supply current, measured through a 0 V source in its supply lead (the testbench's input drivers are not included); average over the run after the first step.");
  L.push("");
  L.push("| Condition | Average power | Average current | Peak current | Settled current (min–max) | Largest spike above settled |");
  L.push("|---|--:|--:|--:|---|--:|");
  for (const c of r.corners) {
    const sp = [...c.supply.spikes].sort((a, b) => b.excessAmps - a.excessAmps)[0];
    L.push(`| ${c.corner.label} | ${eng(c.supply.averageWatts, "W")} | ${eng(c.supply.averageAmps, "A")} | ${eng(c.supply.peakAmps, "A")} | ${eng(c.supply.staticMinAmps, "A")} – ${eng(c.supply.staticMaxAmps, "A")} | ${sp ? `${eng(sp.excessAmps, "A")} (step ${sp.step})` : "–"} |`);
  }
  L.push("");
  if (r.transfer.length) {
    L.push("## Transfer curves");
    L.push("");
    L.push("One cell of each type with the heaviest load it has in the design, one input swept. Unity-gain points (slope −1) of each curve; the engine's figures are its worst case over the corners.");
    L.push("");
    L.push("| Cell type | Load | Condition | V_IL | V_IH | V_OL | V_OH |");
    L.push("|---|---|---|--:|--:|--:|--:|");
    for (const t of r.transfer) {
      L.push(`| ${t.cellType} | ${t.loadText} | engine, worst case | ${volts(t.engine.vILVolts)} | ${volts(t.engine.vIHVolts)} | ${volts(t.engine.vOLVolts)} | ${volts(t.engine.vOHVolts)} |`);
      for (const c of t.curves) {
        const p = c.points;
        const label = r.corners.find((x) => x.corner.id === c.corner)?.corner.label ?? c.corner;
        L.push(`| | | ${label} | ${p ? volts(p.vIlVolts) : "–"} | ${p ? volts(p.vIhVolts) : "–"} | ${p ? volts(p.vOlVolts) : "–"} | ${p ? volts(p.vOhVolts) : "–"} |`);
      }
    }
    L.push("");
  }
  if (r.decoupling) {
    L.push("## Decoupling");
    L.push("");
    L.push(`Recommended: ${r.decoupling.count} × ${eng(r.decoupling.valueFarads, "F")} ceramic (X7R), ${r.decoupling.voltageRatingVolts} V, designators ${r.decoupling.designators.join(", ")}; \`gatewright verify --decoupling\` adds them to the parts list.`);
    L.push("");
    for (const d of r.decoupling.derivation) L.push(`- ${d}`);
    L.push("");
  }
  if (r.notes.length || r.diagnostics.length) {
    L.push("## Notes");
    L.push("");
    for (const n of r.notes) L.push(`- ${n}`);
    for (const d of r.diagnostics) L.push(`- ${d.severity} ${d.code}: ${d.message}`);
    L.push("");
  }
  if (r.files.length) {
    L.push("## Files");
    L.push("");
    for (const f of r.files) L.push(`- \`${f.name}\`: ${f.what}`);
    L.push("");
  }
  L.push("Simulation is a check of the design against its models; confirm the built circuit by measurement, check part ratings at your supply, and work on mains-powered equipment only with proper isolation.");
  return L.join("\n") + "\n";
}
