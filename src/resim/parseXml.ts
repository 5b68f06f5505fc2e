import { InputError } from "../core/errors.js";

/** One element of a parsed document, with the 1-based line of its start tag. */
export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  line: number;
}

/**
 * An InputError about an XML document: "<file>: line <n>, element <Name>: problem". The line is the
 * 1-based line of the element's start tag.
 */
export function xmlInputError(problem: string, file: string, line: number, element?: string): InputError {
  return new InputError(`line ${line}${element ? `, element <${element}>` : ""}: ${problem}`, { file });
}

const NAME = /[A-Za-z_][A-Za-z0-9_.:-]*/y;

function decode(s: string, file: string, line: number): string {
  return s.replace(/&(#x[0-9A-Fa-f]+|#[0-9]+|amp|lt|gt|quot|apos);/g, (_, e: string) => {
    if (e === "amp") return "&";
    if (e === "lt") return "<";
    if (e === "gt") return ">";
    if (e === "quot") return '"';
    if (e === "apos") return "'";
    const code = e[1] === "x" ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10);
    if (!Number.isFinite(code)) throw xmlInputError(`bad character reference &${e};`, file, line);
    return String.fromCodePoint(code);
  }).replace(/&(?![#a-z])/g, () => {
    throw xmlInputError(`a bare "&" must be written &amp;`, file, line);
  });
}

/**
 * A small, dependency-free XML parser for the documents roadsieve writes and reads back: elements,
 * attributes (single or double quotes), comments, the XML declaration and character references.
 * Text content is ignored except that non-blank text where none is expected is an error; CDATA,
 * DOCTYPE and processing instructions other than the declaration are rejected (OpenSCENARIO and
 * OpenDRIVE files need none of them). Errors are InputErrors naming the file and line ("row").
 */
export function parseXml(text: string, file: string): XmlElement {
  let pos = 0;
  let line = 1;
  const n = text.length;
  const advance = (to: number): void => {
    for (let i = pos; i < to; i++) if (text.charCodeAt(i) === 10) line++;
    pos = to;
  };
  const fail = (msg: string): never => {
    throw xmlInputError(`malformed XML: ${msg}`, file, line);
  };
  if (text.charCodeAt(0) === 0xfeff) pos = 1;
  const stack: XmlElement[] = [];
  let root: XmlElement | null = null;
  while (pos < n) {
    const lt = text.indexOf("<", pos);
    const chunk = text.slice(pos, lt < 0 ? n : lt);
    if (chunk.trim() !== "") {
      advance(pos + chunk.search(/\S/));
      fail(stack.length === 0 ? `text outside the root element` : `unexpected text inside <${stack[stack.length - 1]!.name}>`);
    }
    if (lt < 0) {
      advance(n);
      break;
    }
    advance(lt);
    if (text.startsWith("<!--", pos)) {
      const end = text.indexOf("-->", pos + 4);
      if (end < 0) fail("unterminated comment");
      advance(end + 3);
      continue;
    }
    if (text.startsWith("<?", pos)) {
      const end = text.indexOf("?>", pos + 2);
      if (end < 0) fail("unterminated processing instruction");
      const pi = text.slice(pos + 2, end);
      if (!/^xml\s/.test(pi) || root !== null || stack.length > 0) fail(`processing instruction <?${pi.split(/\s/)[0]}?> is not supported`);
      advance(end + 2);
      continue;
    }
    if (text.startsWith("<!", pos)) fail(`"${text.slice(pos, pos + 9)}" (DOCTYPE/CDATA) is not supported`);
    if (text.startsWith("</", pos)) {
      NAME.lastIndex = pos + 2;
      const m = NAME.exec(text);
      if (!m) fail("bad end tag");
      const close = text.indexOf(">", pos);
      if (close < 0 || text.slice(NAME.lastIndex, close).trim() !== "") fail(`bad end tag </${m![0]}`);
      const open = stack.pop();
      if (!open) fail(`end tag </${m![0]}> without a start tag`);
      if (open!.name !== m![0]) fail(`end tag </${m![0]}> does not match <${open!.name}> of line ${open!.line}`);
      advance(close + 1);
      continue;
    }
    // Start tag.
    NAME.lastIndex = pos + 1;
    const m = NAME.exec(text);
    if (!m) fail(`"<" not followed by an element name`);
    const el: XmlElement = { name: m![0], attrs: {}, children: [], line };
    let p = NAME.lastIndex;
    let selfClosing = false;
    for (;;) {
      while (p < n && /\s/.test(text[p]!)) p++;
      if (p >= n) fail(`unterminated start tag <${el.name}>`);
      if (text[p] === ">") {
        p++;
        break;
      }
      if (text[p] === "/" && text[p + 1] === ">") {
        p += 2;
        selfClosing = true;
        break;
      }
      NAME.lastIndex = p;
      const an = NAME.exec(text);
      if (!an) fail(`bad attribute in <${el.name}>`);
      p = NAME.lastIndex;
      while (p < n && /\s/.test(text[p]!)) p++;
      if (text[p] !== "=") fail(`attribute ${an![0]} of <${el.name}> has no value`);
      p++;
      while (p < n && /\s/.test(text[p]!)) p++;
      const q = text[p];
      if (q !== '"' && q !== "'") fail(`attribute ${an![0]} of <${el.name}> is not quoted`);
      const end = text.indexOf(q!, p + 1);
      if (end < 0) fail(`unterminated value of attribute ${an![0]}`);
      const raw = text.slice(p + 1, end);
      if (raw.includes("<")) fail(`"<" inside the value of attribute ${an![0]}`);
      if (an![0] in el.attrs) fail(`attribute ${an![0]} repeated in <${el.name}>`);
      el.attrs[an![0]] = decode(raw, file, line);
      p = end + 1;
    }
    if (stack.length > 0) stack[stack.length - 1]!.children.push(el);
    else if (root === null) root = el;
    else fail(`second root element <${el.name}>`);
    if (!selfClosing) stack.push(el);
    advance(p);
  }
  if (stack.length > 0) fail(`<${stack[stack.length - 1]!.name}> of line ${stack[stack.length - 1]!.line} is never closed`);
  if (root === null) fail("no root element");
  return root!;
}
