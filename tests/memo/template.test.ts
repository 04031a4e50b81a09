/** The memo templates: validation on load names the file, key and placeholder; a copy is used. */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import {
  ATTRIBUTE_PLACEHOLDERS,
  DEFAULT_TEMPLATE_DIR,
  PLACEHOLDERS,
  loadTemplate,
  renderMemo,
  TemplateError,
} from '../../src/memo/index.js';
import { placeholdersIn } from '../../src/memo/template.js';
import { readDocx } from './docx-text.js';
import { buildFixture } from './fixtures.js';

function copyTemplates(): string {
  const dir = join(mkdtempSync(join(tmpdir(), 'tolrate-tpl-')), 'memo');
  cpSync(DEFAULT_TEMPLATE_DIR, dir, { recursive: true });
  return dir;
}

function edit(dir: string, file: string, change: (d: Record<string, any>) => void): void {
  const p = join(dir, file);
  const d = JSON.parse(readFileSync(p, 'utf8')) as Record<string, any>;
  change(d);
  writeFileSync(p, JSON.stringify(d, null, 2));
}

async function problemsOf(dir: string): Promise<TemplateError> {
  try {
    await loadTemplate(dir);
  } catch (e) {
    expect(e).toBeInstanceOf(TemplateError);
    expect(e).toBeInstanceOf(TolrateInputError);
    return e as TemplateError;
  }
  throw new Error('the template loaded without error');
}

describe('the default templates', () => {
  it('load and validate', async () => {
    const t = await loadTemplate();
    expect(t.memo.settings.paper).toMatch(/^(A4|Letter)$/);
    expect(t.outcomes['non-statistical'].resultsNote).toMatch(/not quantified/);
  });

  it('use only known placeholders and every known placeholder is documented in templates/memo/README.md', () => {
    const readme = readFileSync(join(DEFAULT_TEMPLATE_DIR, 'README.md'), 'utf8');
    for (const name of [...Object.keys(PLACEHOLDERS), ...Object.keys(ATTRIBUTE_PLACEHOLDERS)]) {
      expect(readme, `README lists {{${name}}}`).toContain(`{{${name}}}`);
    }
    const listed = [...readme.matchAll(/^\| `\{\{(\w+)\}\}`/gm)].map((m) => m[1]!);
    expect(listed.length).toBe(Object.keys(PLACEHOLDERS).length + Object.keys(ATTRIBUTE_PLACEHOLDERS).length);
    for (const name of listed) expect([...Object.keys(PLACEHOLDERS), ...Object.keys(ATTRIBUTE_PLACEHOLDERS)]).toContain(name);
  });
});

describe('a firm copy of the templates', () => {
  it('names an unknown placeholder with its file and key, and suggests the near one', async () => {
    const dir = copyTemplates();
    edit(dir, 'memo.json', (d) => {
      d.text.intro = 'This memo covers {{entitty}} for {{period}}.';
    });
    const e = await problemsOf(dir);
    expect(e.problems).toHaveLength(1);
    expect(e.problems[0]).toMatchObject({ file: 'memo.json', key: 'text.intro', placeholder: 'entitty' });
    expect(e.message).toContain('memo.json, text.intro: {{entitty}} is not a known placeholder. Did you mean {{entity}}?');
    rmSync(dir, { recursive: true });
  });

  it('names unknown placeholders in an outcome file and in a list of paragraphs', async () => {
    const dir = copyTemplates();
    edit(dir, 'outcomes/haphazard.json', (d) => {
      d.resultsNote = 'Chosen by {{chooser}}.';
    });
    edit(dir, 'memo.json', (d) => {
      d.text.reperformManual[2] = 'Count with {{counter}}.';
    });
    const e = await problemsOf(dir);
    expect(e.problems.map((p) => [p.file, p.key, p.placeholder])).toEqual([
      ['memo.json', 'text.reperformManual[2]', 'counter'],
      ['outcomes/haphazard.json', 'resultsNote', 'chooser'],
    ]);
    expect(e.message).toContain('has 2 problems');
    expect(e.details.join('\n')).toContain('outcomes/haphazard.json, resultsNote: {{chooser}} is not a known placeholder.');
    rmSync(dir, { recursive: true });
  });

  it('accepts a per-attribute placeholder only in the per-attribute texts', async () => {
    const dir = copyTemplates();
    edit(dir, 'memo.json', (d) => {
      d.text.extension = 'For {{attributeId}}: {{extension}} more items ({{entity}}).';
      d.text.caution = 'Computed for {{attributeId}}.';
    });
    const e = await problemsOf(dir);
    expect(e.problems).toHaveLength(1);
    expect(e.problems[0]).toMatchObject({ file: 'memo.json', key: 'text.caution', placeholder: 'attributeId' });
    expect(e.problems[0]!.message).toContain('is known only in the per-attribute texts (text.extension)');
    rmSync(dir, { recursive: true });
  });

  it('names missing and unknown keys, unbalanced braces and broken JSON', async () => {
    const dir = copyTemplates();
    edit(dir, 'memo.json', (d) => {
      delete d.text.caution;
      d.headings.introduction = 'Introduction';
      d.labels.yes = 'Yes {{entity';
    });
    writeFileSync(join(dir, 'outcomes/draft.json'), '{ "headerMark": "DRAFT", ');
    const e = await problemsOf(dir);
    const byKey = Object.fromEntries(e.problems.map((p) => [`${p.file} ${p.key}`, p.message]));
    expect(byKey['memo.json text.caution']).toMatch(/is missing/);
    expect(byKey['memo.json headings.introduction']).toMatch(/is not a key the memo uses/);
    expect(byKey['memo.json labels.yes']).toMatch(/unbalanced/);
    expect(byKey['outcomes/draft.json (file)']).toMatch(/is not valid JSON/);
    rmSync(dir, { recursive: true });
  });

  it('says which file is missing, and which folder does not exist', async () => {
    const dir = copyTemplates();
    rmSync(join(dir, 'outcomes', 'supported.json'));
    const e = await problemsOf(dir);
    expect(e.problems[0]).toMatchObject({ file: 'outcomes/supported.json', key: '(file)' });
    await expect(loadTemplate(join(dir, 'nope'))).rejects.toThrow(/No memo template folder/);
    rmSync(dir, { recursive: true });
  });

  it("is used for the memo's wording", async () => {
    const dir = copyTemplates();
    edit(dir, 'memo.json', (d) => {
      d.title = 'Prüfung der Kontrolle {{controlId}}';
      d.headings.results = 'Ergebnisse je Merkmal';
      d.settings.paper = 'Letter';
      d.settings.numberHeadings = false;
    });
    edit(dir, 'outcomes/not-supported.json', (d) => {
      d.verdict = 'Kein Verlass auf {{controlId}} ({{attributesNotSupported}}).';
    });
    const f = buildFixture({ variant: 'not-supported' });
    const doc = await readDocx(await renderMemo(f.wp, { workpaperPath: f.path, templateDir: dir }));
    expect(doc.text).toContain('Prüfung der Kontrolle AP-03');
    expect(doc.paragraphs).toContain('Ergebnisse je Merkmal');
    expect(doc.text).toContain('Kein Verlass auf AP-03 (A1).');
    // Letter paper: 12240 × 15840 twips.
    expect(doc.xml).toMatch(/<w:pgSz w:w="12240" w:h="15840"/);
    rmSync(dir, { recursive: true });
  });
});

describe("a firm's Word styles", () => {
  it('are taken from styles.docx in the template folder', async () => {
    const { Document, Packer, Paragraph, HeadingLevel } = await import('docx');
    const firm = new Document({
      styles: {
        default: { heading1: { run: { font: 'Georgia', size: 30, color: '7A1F1F' } } },
        paragraphStyles: [{ id: 'FirmBody', name: 'Firm Body', basedOn: 'Normal', run: { font: 'Georgia' } }],
      },
      sections: [{ children: [new Paragraph({ heading: HeadingLevel.HEADING_1, text: 'Firm' })] }],
    });
    const dir = copyTemplates();
    writeFileSync(join(dir, 'styles.docx'), await Packer.toBuffer(firm));
    const t = await loadTemplate(dir);
    expect(t.externalStyles).toContain('FirmBody');
    const f = buildFixture({ variant: 'supported' });
    const doc = await readDocx(await renderMemo(f.wp, { workpaperPath: f.path, template: t }));
    const styles = await doc.zip.file('word/styles.xml')!.async('string');
    expect(styles).toContain('w:styleId="FirmBody"');
    const heading1 = /<w:style [^>]*w:styleId="Heading1"[\s\S]*?<\/w:style>/.exec(styles)![0];
    expect(heading1).toContain('Georgia');
    expect(heading1).toContain('7A1F1F');
    // The memo's own table style is still there for its tables.
    expect(styles).toContain('w:styleId="TableText"');
    rmSync(dir, { recursive: true });
  });

  it('a styles.docx that is not a Word document is a clear error', async () => {
    const dir = copyTemplates();
    writeFileSync(join(dir, 'styles.docx'), 'not a zip');
    await expect(loadTemplate(dir)).rejects.toThrow(/styles\.docx is not a Word document/);
    rmSync(dir, { recursive: true });
  });
});

describe('placeholdersIn', () => {
  it('finds names with or without spaces inside the braces', () => {
    expect(placeholdersIn('a {{x}} b {{ y }} c {{z}}')).toEqual(['x', 'y', 'z']);
  });
});
