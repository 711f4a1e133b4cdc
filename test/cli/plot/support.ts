/**
 * Reading the renderer's SVG back for the plot tests: a well-formedness
 * check and a parse with fast-xml-parser (an XML parser from npm, not
 * ours), and the elements the tests look for (series paths, axis groups).
 */
import { XMLParser, XMLValidator } from 'fast-xml-parser';

/** An element as the parser gives it: attributes under their own names, children by tag. */
export type XmlNode = { readonly [key: string]: unknown };

const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', parseAttributeValue: false, trimValues: false });

/** Parses `text` as XML after checking it is well-formed; throws with the validator's reason otherwise. */
export function parseXml(text: string): XmlNode {
  const valid = XMLValidator.validate(text);
  if (valid !== true) throw new Error(`not well-formed XML: ${valid.err.msg} at line ${valid.err.line}`);
  return parser.parse(text) as XmlNode;
}

/** Every element below `node` (depth first) for which `keep` holds. */
export function findAll(node: unknown, keep: (n: XmlNode) => boolean): XmlNode[] {
  const out: XmlNode[] = [];
  const visit = (v: unknown): void => {
    if (Array.isArray(v)) {
      for (const x of v) visit(x);
      return;
    }
    if (v === null || typeof v !== 'object') return;
    const n = v as XmlNode;
    if (keep(n)) out.push(n);
    for (const child of Object.values(n)) if (typeof child === 'object') visit(child);
  };
  visit(node);
  return out;
}

/** The series elements (paths and the histogram group) of a parsed SVG: name → points drawn. */
export function seriesCounts(doc: XmlNode): Map<string, number> {
  return new Map(findAll(doc, (n) => typeof n['data-series'] === 'string').map((n) => [n['data-series'] as string, Number(n['data-points'])]));
}

/** The axis groups of a parsed SVG: axis name → shown range. */
export function axisRanges(doc: XmlNode): Map<string, { min: number; max: number }> {
  return new Map(findAll(doc, (n) => typeof n['data-axis'] === 'string' && n['data-min'] !== undefined).map((n) => [n['data-axis'] as string, { min: Number(n['data-min']), max: Number(n['data-max']) }]));
}

/** The text of an element (the parser gives plain text as a string, or as `#text` beside attributes). */
export function textOf(n: unknown): string {
  if (typeof n === 'string' || typeof n === 'number') return String(n);
  if (n && typeof n === 'object' && '#text' in n) return String((n as XmlNode)['#text']);
  return '';
}
