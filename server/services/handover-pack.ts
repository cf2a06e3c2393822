import path from 'node:path';
import PDFDocument from 'pdfkit';
import { HANDOVER_CHECKLIST, HANDOVER_NOTE, WARRANTY_REMINDER } from '../../shared/handover.ts';
import { workSansFiles } from '../paths.ts';

/*
 * The handover pack: one PDF the householder keeps, built with pdfkit. Text is set in Work Sans
 * (SIL Open Font License, the package @fontsource/work-sans), embedded, so £, °, – and × print as
 * themselves; pdfkit's built-in fonts only know Windows-1252.
 */
const fontDir = workSansFiles;
const FONTS = {
  body: path.join(fontDir, 'work-sans-latin-400-normal.woff'),
  bold: path.join(fontDir, 'work-sans-latin-600-normal.woff'),
  // The package splits the font by script: names like Łukasiewicz or Dvořák take their letters from the Latin Extended files.
  'body-ext': path.join(fontDir, 'work-sans-latin-ext-400-normal.woff'),
  'bold-ext': path.join(fontDir, 'work-sans-latin-ext-600-normal.woff'),
};
type Weight = 'body' | 'bold';

/** Latin Extended-A/B and Additional: the letters the latin files lack. */
const EXTENDED = /[\u0100-\u024f\u1e00-\u1eff]/;

/**
 * Text split into runs by which of the font's files holds its letters.
 * @example runsOf('Łódź') // [{ ext: true, text: 'Ł' }, { ext: false, text: 'ó' }, { ext: true, text: 'dź' }]
 */
export function runsOf(text: string): { ext: boolean; text: string }[] {
  const runs: { ext: boolean; text: string }[] = [];
  for (const ch of text) {
    const ext = EXTENDED.test(ch);
    const last = runs.at(-1);
    if (last && last.ext === ext) last.text += ch;
    else runs.push({ ext, text: ch });
  }
  return runs;
}

/** Our own inks (the product's teal and slate), for print. */
const INK = '#1d2730';
const MUTED = '#4a5560';
const ACCENT = '#0b5c7a';
const CAUTION_EDGE = '#b7791f';

export interface PackReading {
  label: string;
  value: string;
  range: string;
  verdict: string;
}

export interface PackFacts {
  firm: { name: string; phone: string | null; email: string | null };
  job: { reference: string; customerName: string; siteAddress: string; siteTown: string; sitePostcode: string };
  unit: { model: string; maker: string } | null;
  /** "Monday 1 June 2026", in the firm's zone. */
  handedOverOn: string;
  householderName: string;
  handedOverBy: string | null;
  commissioning: { checks: { label: string; done: boolean }[]; readings: PackReading[]; notes: string | null } | null;
  /** The certificate in one line, or why there is none. */
  certificateLine: string;
  /** The water-care routine: what to do and how often. */
  waterCare: readonly string[];
  serviceVisits: { reference: string; month: string }[];
  signaturePng: Buffer;
}

/**
 * The householder's routine between service visits (common practice, no source): the product's
 * cautions follow it on the sheet, and the maker's manual and the products' labels decide.
 */
export const WATER_CARE_ROUTINE = [
  'Test the water two or three times a week, and after a party or heavy use, with the test kit left with you.',
  'Keep the sanitiser and the pH within the ranges on the commissioning record above; adjust a little at a time with the pumps running and the cover off, then test again.',
  'Rinse the filters every week or two and soak them in filter cleaner every month or so; switch off at the isolator first.',
  'Drain, clean and refill every three to four months, or sooner when the water will not stay clear.',
  'Keep the cover on and its straps locked whenever the spa is not in use.',
] as const;

/** Builds the pack; resolves with the PDF's bytes. */
export function buildHandoverPack(f: PackFacts): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margin: 50,
    info: { Title: `Handover pack, ${f.job.reference}`, Author: f.firm.name, Subject: 'Hot tub handover' },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  for (const [name, file] of Object.entries(FONTS)) doc.registerFont(name, file);
  /** Text that may hold anyone's name, run by run in the font file that has its letters. */
  const mixed = (text: string, weight: Weight, options: PDFKit.Mixins.TextOptions, at?: { x: number; y: number }) => {
    const runs = runsOf(text);
    runs.forEach((r, i) => {
      doc.font(r.ext ? `${weight}-ext` : weight);
      const opts = { ...options, continued: i < runs.length - 1 };
      if (i === 0 && at) doc.text(r.text, at.x, at.y, opts);
      else doc.text(r.text, opts);
    });
  };

  const width = doc.page.width - 100;
  const heading = (text: string) => {
    if (doc.y > doc.page.height - 140) doc.addPage();
    doc
      .moveDown(0.8)
      .font('bold')
      .fontSize(14)
      .fillColor(ACCENT)
      .text(text)
      .moveDown(0.3)
      .font('body')
      .fontSize(10.5)
      .fillColor(INK);
  };
  const line = (text: string) => {
    doc.fontSize(10.5).fillColor(INK);
    mixed(text, 'body', { width });
  };
  const bullets = (items: readonly string[]) =>
    doc
      .font('body')
      .fontSize(10.5)
      .fillColor(INK)
      .list([...items], { width: width - 15, bulletRadius: 2, textIndent: 12, paragraphGap: 3 });
  const cautionBox = (title: string, items: readonly string[]) => {
    const top = doc.y;
    doc
      .font('bold')
      .fontSize(11)
      .fillColor(INK)
      .text(title, 62, top, { width: width - 12 })
      .moveDown(0.2);
    doc
      .font('body')
      .fontSize(10)
      .list([...items], 62, doc.y, { width: width - 27, bulletRadius: 2, textIndent: 12, paragraphGap: 2 });
    doc
      .font('bold')
      .fontSize(10)
      .text(HANDOVER_NOTE, 62, doc.y + 2, { width: width - 12 });
    doc
      .save()
      .moveTo(52, top - 2)
      .lineTo(52, doc.y + 2)
      .lineWidth(3)
      .strokeColor(CAUTION_EDGE)
      .stroke()
      .restore();
    doc.x = 50;
    doc.moveDown(0.5);
  };

  doc.font('bold').fontSize(20).fillColor(INK).text('Your hot tub handover pack');
  doc.fontSize(11).fillColor(MUTED);
  mixed(`${f.firm.name} · job ${f.job.reference}`, 'body', {});
  doc.moveDown(0.6);
  line(`For: ${f.job.customerName}`);
  line(`Where: ${f.job.siteAddress}, ${f.job.siteTown} ${f.job.sitePostcode}`);
  if (f.unit) line(`Unit: ${f.unit.model} (${f.unit.maker})`);
  line(`Handed over: ${f.handedOverOn}${f.handedOverBy ? ` by ${f.handedOverBy}` : ''}`);

  heading('Commissioning record');
  if (!f.commissioning) {
    line(`The commissioning record was not on file when this pack was made; ask ${f.firm.name} for it.`);
  } else {
    for (const c of f.commissioning.checks) line(`${c.done ? 'Done' : 'Not done'}: ${c.label}`);
    doc.moveDown(0.4);
    const cols = [0, 170, 280, 400];
    const row = (cells: string[], font: 'body' | 'bold') => {
      const y = doc.y;
      cells.forEach((cell, i) =>
        doc
          .font(font)
          .fontSize(10.5)
          .fillColor(INK)
          .text(cell, 50 + cols[i]!, y, { width: (cols[i + 1] ?? width) - cols[i]! - 8 }),
      );
      doc.x = 50;
      doc.y = y + 16;
    };
    row(['Reading', 'Measured', 'Range', 'Result'], 'bold');
    for (const r of f.commissioning.readings) row([r.label, r.value, r.range, r.verdict], 'body');
    if (f.commissioning.notes) doc.moveDown(0.3).text(`Notes: ${f.commissioning.notes}`, 50, doc.y, { width });
  }

  heading('Electrical certificate');
  line(f.certificateLine);

  heading('Looking after the water');
  bullets(f.waterCare);
  doc.moveDown(0.4);
  const water = HANDOVER_CHECKLIST.find((i) => i.id === 'water_care')!;
  const chemicals = HANDOVER_CHECKLIST.find((i) => i.id === 'chemicals')!;
  cautionBox('Chemical safety and water hygiene', [...chemicals.cautions, ...water.cautions]);

  heading('What we went through with you');
  for (const item of HANDOVER_CHECKLIST) {
    if (doc.y > doc.page.height - 120) doc.addPage();
    doc.font('bold').fontSize(10.5).fillColor(INK).text(item.title, { width });
    line(item.shown);
    if (item.id !== 'water_care' && item.id !== 'chemicals') bullets(item.cautions);
    doc.moveDown(0.3);
  }

  heading('Register your warranty');
  line(WARRANTY_REMINDER);

  heading('Who to call');
  line(`${f.firm.name}${f.firm.phone ? `: ${f.firm.phone}` : ''}${f.firm.email ? `, ${f.firm.email}` : ''}`);
  line(
    'For a fault, a question about the water, or to move a service visit. In an emergency switch the spa off at the isolator, then call.',
  );

  if (f.serviceVisits.length) {
    heading('Your service visits');
    line(`${f.firm.name} will be in touch to book each visit:`);
    bullets(f.serviceVisits.map((v) => `${v.month} (${v.reference})`));
  }

  heading('Signed');
  line(`${f.householderName} signed to say the items above were gone through with them, on ${f.handedOverOn}.`);
  if (doc.y > doc.page.height - 150) doc.addPage();
  doc.image(f.signaturePng, 50, doc.y + 6, { fit: [240, 90] });
  doc.y += 100;
  doc.save().moveTo(50, doc.y).lineTo(290, doc.y).lineWidth(0.5).strokeColor(MUTED).stroke().restore();
  doc.fontSize(9).fillColor(MUTED);
  mixed(f.householderName, 'body', {}, { x: 50, y: doc.y + 4 });
  doc.end();
  return done;
}
