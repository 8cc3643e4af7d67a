// Rendering view models through the Handlebars templates of templates/. Templates only place
// text: every number is computed and formatted before it reaches them.
import Handlebars from "handlebars";
import { TEMPLATES } from "./generated/templates.js";

const hb = Handlebars.create();

/** RFC 4180 field: quoted when it holds a comma, a quote or a line break; quotes doubled. */
export function csvField(value: unknown): string {
  const s = value === undefined || value === null ? "" : String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

hb.registerHelper("csv", (v: unknown) => new hb.SafeString(csvField(v)));

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
