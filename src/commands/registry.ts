/**
 * The command table. Each command lives in src/commands/NAME/index.ts and exports
 * `run(args, ctx)`; it is imported only when called, so `tolrate --help` stays fast.
 */
export interface CommandInfo {
  name: string;
  summary: string;
  group: 'test' | 'calculators' | 'other';
  usage: string;
}

export const COMMANDS: readonly CommandInfo[] = [
  { name: 'plan', group: 'test', usage: 'tolrate plan [FILE] [--from LAST.tolrate.json]', summary: 'Plan a test: engagement, control, attributes, population, sample size, selection' },
  { name: 'record', group: 'test', usage: 'tolrate record FILE [--part interim|roll-forward]', summary: 'Record each item\'s result and the cause of every deviation' },
  { name: 'rollforward', group: 'test', usage: 'tolrate rollforward FILE', summary: 'Roll a test done at an interim date forward: interim date, roll-forward population, size, selection' },
  { name: 'conclude', group: 'test', usage: 'tolrate conclude FILE', summary: 'Evaluate the results, review the causes, conclude and list follow-up actions' },
  { name: 'review', group: 'test', usage: 'tolrate review FILE', summary: 'Review a test: re-perform it, raise and clear review notes, sign off as reviewer' },
  { name: 'memo', group: 'test', usage: 'tolrate memo FILE [--out MEMO.docx] [--template DIR] [--oc]', summary: 'Write the DOCX workpaper memo from a workpaper file' },
  { name: 'reperform', group: 'test', usage: 'tolrate reperform FILE', summary: 'Re-derive the selection and every figure and report any difference' },
  { name: 'status', group: 'test', usage: 'tolrate status [DIR] [--reperform] [--json]', summary: 'Where every test of an engagement folder stands: figures, decisions, review, follow-ups due' },
  { name: 'summary', group: 'test', usage: 'tolrate summary [DIR] [--out NAME]', summary: 'Write the engagement summary (DOCX and XLSX): results, deviations, deficiencies, follow-ups' },
  { name: 'size', group: 'calculators', usage: 'tolrate size --confidence 95 --tolerable 6 --expected 1', summary: 'Sample size for an attribute test' },
  { name: 'limit', group: 'calculators', usage: 'tolrate limit --sample 78 --deviations 2 --confidence 95', summary: 'Upper deviation limit, risk of overreliance and decision' },
  { name: 'table', group: 'calculators', usage: 'tolrate table --confidence 95', summary: 'Planning table of sample sizes over tolerable and expected rates' },
  { name: 'select', group: 'calculators', usage: 'tolrate select (--population FILE --key COLUMN | --ranges LIST | --every UNIT --from DATE --to DATE) --size N --out SHEET.csv', summary: 'Select a reproducible sample and write the fieldwork sheet' },
  { name: 'demo', group: 'other', usage: 'tolrate demo [--out DIR] [--engagement]', summary: 'Run the whole test on the invented demo scenario, no questions asked' },
];

export function findCommand(name: string): CommandInfo | undefined {
  return COMMANDS.find((c) => c.name === name);
}
