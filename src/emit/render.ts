// Rendering view models through the Handlebars templates of templates/. Templates only place
// text: every number is computed and formatted before it reaches them.
//
// A section that grows with the design (the netlist's instances, the parts list's rows, the
// testbench's steps, ...) is not rendered through Handlebars item by item: the template holds a
// line `{{streamed "name"}}` where it goes, and renderTo hands the template's text around it to
// the output and, in its place, calls the emitter's producer for that section, which writes the
// section's lines (each with its own line break) straight to the output. The marker's own line
// break is dropped.
import Handlebars from "handlebars";
import { TEMPLATES } from "./generated/templates.js";
import type { TextProducer, TextSink } from "./output.js";

const hb = Handlebars.create();

/** RFC 4180 field: quoted when it holds a comma, a quote or a line break; quotes doubled. */
export function csvField(value: unknown): string {
  const s = value === undefined || value === null ? "" : String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

hb.registerHelper("csv", (v: unknown) => new hb.SafeString(csvField(v)));

/** Opens and closes a section marker in a rendered template (no source text holds these). */
const MARK_OPEN = "\u0000\u0001gw-section:";
const MARK_CLOSE = "\u0001\u0000";
hb.registerHelper("streamed", (name: unknown) => new hb.SafeString(`${MARK_OPEN}${String(name)}${MARK_CLOSE}`));

const compiled = new Map<string, HandlebarsTemplateDelegate>();

export function render(name: string, view: object): string {
  let t = compiled.get(name);
  if (!t) {
    const text = TEMPLATES[name];
    if (text === undefined) throw new Error(`no template '${name}'`);
    t = hb.compile(text, { noEscape: true, strict: true });
    compiled.set(name, t);
  }
  return t(view);
}

/** Renders template `name` to `out`, with each `{{streamed "x"}}` line replaced by what
 *  `sections.x` writes. */
export function renderTo(out: TextSink, name: string, view: object, sections: Record<string, TextProducer> = {}): void {
  const text = render(name, view);
  let at = 0;
  for (;;) {
    const open = text.indexOf(MARK_OPEN, at);
    if (open < 0) break;
    const close = text.indexOf(MARK_CLOSE, open);
    const key = text.slice(open + MARK_OPEN.length, close);
    const produce = Object.hasOwn(sections, key) ? sections[key] : undefined;
    if (!produce) throw new Error(`template '${name}' streams a section '${key}' its emitter does not make`);
    if (open > at) out(text.slice(at, open));
    produce(out);
    at = close + MARK_CLOSE.length;
    if (text.charCodeAt(at) === 10) at++;
  }
  if (at < text.length) out(at === 0 ? text : text.slice(at));
}
