// Output files whose text is produced in pieces. The writer (src/cli/write.ts) hands each piece
// to the file as it comes, so no file's whole text is held at once, and a large design's files
// cost memory in proportion to a piece, not to the design. Readers that want the text itself
// (tests, verify) read `content`, which joins the pieces once and keeps the result.
//
// The pieces are made when the file is written or read, from the emit context as it stands
// then: emitting stays a pure function of that context, which nothing changes after emitDesign.

/** Takes the next piece of a file's text. */
export type TextSink = (piece: string) => void;
/** Produces a text, in order, as pieces handed to `out`. */
export type TextProducer = (out: TextSink) => void;

export interface OutputFile {
  name: string;
  /** The whole text (joined from the pieces the first time it is read). */
  content: string;
  what: string;
  /** Hands the text to `out` in pieces, in order (not enumerable: a copy of the object made with
   *  spread syntax carries `content` only, so a changed copy never writes the old text). */
  writeTo?: (out: TextSink) => void;
}

/** The whole text a producer makes. */
export function textOf(produce: TextProducer): string {
  const parts: string[] = [];
  produce((p) => parts.push(p));
  return parts.join("");
}

/** An output file whose text `produce` makes, piece by piece, when it is written or read. */
export function producedFile(name: string, what: string, produce: TextProducer): OutputFile {
  let text: string | undefined;
  const file = { name } as OutputFile;
  Object.defineProperty(file, "content", {
    enumerable: true,
    configurable: true,
    get: () => (text ??= textOf(produce)),
    set: (value: string) => {
      text = value;
    },
  });
  file.what = what;
  Object.defineProperty(file, "writeTo", {
    enumerable: false,
    configurable: true,
    value: (out: TextSink) => {
      if (text !== undefined) out(text);
      else produce(out);
    },
  });
  return file;
}
