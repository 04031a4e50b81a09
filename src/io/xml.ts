/**
 * Strict XML checks of the documents tolrate writes and reads (DOCX, XLSX are zip files of XML
 * parts). saxes is a strict XML 1.0 parser: a forbidden character, an unclosed tag or a bad
 * entity is an error with its line and column. The error never quotes the document's text.
 */
import { SaxesParser } from 'saxes';

/** Where an XML text does not parse, or undefined when it parses. */
export function xmlProblem(xml: string, name = 'the XML'): string | undefined {
  const parser = new SaxesParser({ xmlns: true, position: true });
  let problem: string | undefined;
  parser.on('error', (e) => {
    if (problem === undefined) {
      // saxes messages are "file:line:column: what"; keep the place and the kind of problem only.
      const m = /(\d+):(\d+): (.*)$/.exec(e.message);
      problem = m ? `${name} does not parse at line ${m[1]}, column ${m[2]}: ${m[3]!.replace(/\s+/g, ' ').slice(0, 120)}` : `${name} does not parse`;
    }
  });
  try {
    parser.write(xml).close();
  } catch {
    problem ??= `${name} does not parse`;
  }
  return problem;
}

/** The XML parts of a zip file (DOCX, XLSX) that do not parse, each with where. */
export async function zipXmlProblems(data: Uint8Array): Promise<string[]> {
  const { default: JSZip } = await import('jszip');
  const zip = await JSZip.loadAsync(data);
  const problems: string[] = [];
  for (const name of Object.keys(zip.files).sort()) {
    const f = zip.files[name]!;
    if (f.dir || !/\.(xml|rels)$/i.test(name)) continue;
    const p = xmlProblem(await f.async('string'), name);
    if (p) problems.push(p);
  }
  return problems;
}
