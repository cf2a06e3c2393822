import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { CAUTION_NOTE, CAUTIONS, cautionLines, cautionsFor } from '../../shared/cautions.ts';
import { DEFAULT_TEMPLATES } from '../../shared/templates/defaults.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

function files(dir: string): string[] {
  return readdirSync(path.join(root, dir)).flatMap((name) => {
    const rel = path.join(dir, name);
    return statSync(path.join(root, rel)).isDirectory() ? files(rel) : /\.(ts|vue)$/.test(rel) ? [rel] : [];
  });
}

describe('the one caution list', () => {
  it('gives every kind of stage the templates can plan its own cautions, ending with the note', () => {
    const kinds = new Set(Object.values(DEFAULT_TEMPLATES).flatMap((t) => t.stages.map((s) => s.kind)));
    expect(kinds.size).toBeGreaterThan(10);
    for (const kind of kinds) {
      expect(cautionLines(kind).length, kind).toBeGreaterThan(0);
      expect(cautionsFor(kind).at(-1), kind).toBe(CAUTION_NOTE);
    }
  });

  it('warns of the dangers of each kind of work (the cautions the trade expects; general words, defer to local codes)', () => {
    const say = (kind: string) => cautionLines(kind).join(' ');
    expect(say('base_pour')).toMatch(/Wet concrete burns skin/);
    expect(say('base_pour')).not.toMatch(/sanitiser/i);
    expect(say('excavation')).toMatch(/collapse/);
    expect(say('excavation')).toMatch(/trained, competent operators/);
    expect(say('excavation')).toMatch(/undermine nearby foundations/);
    expect(say('excavation')).toMatch(/water standing in the pit/);
    expect(say('lift')).toMatch(/thoroughly examined/);
    expect(say('lift')).toMatch(/ground mats go under the outriggers/);
    expect(say('lift')).toMatch(/overhead power lines/);
    expect(say('lift')).toMatch(/slinger\/signaller/);
    expect(say('lift')).toMatch(/highway permit/);
    expect(say('electrical_connect')).toMatch(/zones around the water/);
    expect(say('electrical_connect')).toMatch(/30 mA RCD/);
    expect(say('electrical_connect')).toMatch(/supplementary bonding/);
    expect(say('electrical_connect')).toMatch(/within sight of the unit, out of a bather's reach/);
    expect(say('electrical_connect')).toMatch(/earthing arrangement/);
    expect(say('electrical_connect')).toMatch(/notify building control/);
    expect(say('fill')).toMatch(/backflow protection/);
    expect(say('fill')).toMatch(/Never run the pumps or the heater dry/);
    expect(say('commission')).toMatch(/legionella/);
    expect(say('commission')).toMatch(/oxidisers apart from acids/);
    expect(say('commission')).toMatch(/safety data sheet/);
    expect(say('lift')).toMatch(/enough people for the unit's weight/);
  });

  it('is the only place caution text is written: every output imports it', () => {
    // A line of each topic, searched for in every other source file: it must not be written twice.
    const samples = Object.values(CAUTIONS).map((lines) => lines[0]!.slice(0, 40));
    const offenders: string[] = [];
    for (const file of [...files('server'), ...files('src'), ...files('shared'), ...files('workers')]) {
      if (file === path.join('shared', 'cautions.ts')) continue;
      const text = readFileSync(path.join(root, file), 'utf8');
      for (const sample of samples) if (text.includes(sample)) offenders.push(`${file}: ${sample}`);
    }
    expect(offenders).toEqual([]);
    const outputs = [
      'server/mail/messages.ts',
      'server/pages/answers.ts',
      'server/services/feeds.ts',
      'server/services/partner-slots.ts',
      'server/services/day-sheets.ts',
      'server/services/plans.ts',
    ];
    for (const file of outputs)
      expect(readFileSync(path.join(root, file), 'utf8'), file).toMatch(/from '\.\.\/\.\.\/shared\/cautions\.ts'/);
  });
});
