import type { Knex } from 'knex';
import { DEMO_ACCOUNTS } from './demo-accounts.ts';

/**
 * The demo scenario (all names invented): one installer with three crews and its own and hired
 * plant, its partner firms, a second installer sharing one electrical firm, and 24 jobs over the
 * coming six weeks at different stages. Dates are relative to `today`, so the board is always live.
 */

type Firm = { name: string; kind: string; region?: string; phone: string };
const FIRMS: Firm[] = [
  { name: 'Tideway Hot Tubs', kind: 'installer', phone: '0113 496 0001' },
  { name: 'Moorview Spas', kind: 'installer', phone: '01423 496 002' },
  { name: 'Fellside Crane Hire', kind: 'crane_hire', phone: '0113 496 0101' },
  { name: 'Ridgeway Plant Hire', kind: 'plant_hire', phone: '0113 496 0102' },
  { name: 'Brightspark Electrical', kind: 'electrical', phone: '0113 496 0103' },
  { name: 'Northgate Electrical', kind: 'electrical', phone: '0113 496 0104' },
  { name: 'Millstone Groundworks', kind: 'groundworks', phone: '0113 496 0105' },
  { name: 'Carrow Haulage', kind: 'haulage', phone: '0113 496 0106' },
];

const WEEKDAYS_8_TO_5 = { 1: [[480, 1020]], 2: [[480, 1020]], 3: [[480, 1020]], 4: [[480, 1020]], 5: [[480, 1020]] };
const ELECTRICIAN_HOURS = { 1: [[450, 990]], 2: [[450, 990]], 3: [[450, 990]], 4: [[450, 990]], 5: [[450, 990]], 6: [[480, 720]] };

type Res = { firm: string; name: string; category: 'crew' | 'person' | 'machine'; kind: string; ownership?: 'owned' | 'hired'; calendar?: string; email?: string; members?: string[] };
const RESOURCES: Res[] = [
  { firm: 'Tideway Hot Tubs', name: 'Connor Reid', category: 'person', kind: 'installer', email: 'connor.reid@tideway.example' },
  { firm: 'Tideway Hot Tubs', name: 'Aisha Bello', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Jamie Whitlow', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Rhys Pennock', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Lena Marsh', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Dev Chauhan', category: 'person', kind: 'installer' },
  { firm: 'Tideway Hot Tubs', name: 'Crew Heron', category: 'crew', kind: 'install_crew', members: ['Connor Reid', 'Aisha Bello'] },
  { firm: 'Tideway Hot Tubs', name: 'Crew Kestrel', category: 'crew', kind: 'install_crew', members: ['Jamie Whitlow', 'Rhys Pennock'] },
  { firm: 'Tideway Hot Tubs', name: 'Crew Otter', category: 'crew', kind: 'install_crew', members: ['Lena Marsh', 'Dev Chauhan'] },
  { firm: 'Tideway Hot Tubs', name: '1.5 t excavator', category: 'machine', kind: 'excavator' },
  { firm: 'Tideway Hot Tubs', name: '3 t excavator (hired)', category: 'machine', kind: 'excavator', ownership: 'hired' },
  { firm: 'Tideway Hot Tubs', name: 'Tracked dumper', category: 'machine', kind: 'dumper' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 1', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 2', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 3', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Pallet truck 4', category: 'machine', kind: 'pallet_truck' },
  { firm: 'Tideway Hot Tubs', name: 'Roller set', category: 'machine', kind: 'rollers' },
  { firm: 'Fellside Crane Hire', name: '25 t city crane', category: 'machine', kind: 'crane' },
  { firm: 'Fellside Crane Hire', name: '60 t mobile crane', category: 'machine', kind: 'crane' },
  { firm: 'Brightspark Electrical', name: 'Priya Nair', category: 'person', kind: 'electrician', calendar: 'Electricians', email: 'priya.nair@brightspark.example' },
  { firm: 'Brightspark Electrical', name: 'Tom Ashworth', category: 'person', kind: 'electrician', calendar: 'Electricians' },
  { firm: 'Northgate Electrical', name: 'Gareth Pryce', category: 'person', kind: 'electrician', calendar: 'Electricians' },
  { firm: 'Millstone Groundworks', name: 'Millstone gang', category: 'crew', kind: 'groundworks_crew' },
  { firm: 'Carrow Haulage', name: '18 t lorry with loader crane', category: 'machine', kind: 'lorry' },
  { firm: 'Moorview Spas', name: 'Moorview crew', category: 'crew', kind: 'install_crew' },
];

const UNITS = [
  { model: 'Brook 4', maker: 'Harbourline Works', lengthMm: 2000, widthMm: 2000, heightMm: 850, dryWeightKg: 300, filledWeightKg: 1650, waterLitres: 1250, supplies: [{ amps: 16 }], makerLeadDays: 15 },
  { model: 'Aurora 6', maker: 'Harbourline Works', lengthMm: 2200, widthMm: 2200, heightMm: 900, dryWeightKg: 380, filledWeightKg: 2300, waterLitres: 1500, supplies: [{ amps: 32 }], makerLeadDays: 20 },
  { model: 'Solway 7', maker: 'Ostra Baths', lengthMm: 2300, widthMm: 2300, heightMm: 950, dryWeightKg: 450, filledWeightKg: 2900, waterLitres: 1900, supplies: [{ amps: 32 }], makerLeadDays: 25 },
  { model: 'Tarn Swim 45', maker: 'Ostra Baths', lengthMm: 4500, widthMm: 2300, heightMm: 1300, dryWeightKg: 1600, filledWeightKg: 10500, waterLitres: 8900, supplies: [{ amps: 32 }, { amps: 32 }], makerLeadDays: 35 },
];

type StagePlan = { kind: string; name: string; minutes: number; needs: [string, number][]; cure?: number };
const IN_GROUND: StagePlan[] = [
  { kind: 'survey', name: 'Site survey', minutes: 120, needs: [['install_crew', 1]] },
  { kind: 'excavation', name: 'Excavate pit', minutes: 720, needs: [['groundworks_crew', 1], ['excavator', 1], ['dumper', 1]] },
  { kind: 'base_pour', name: 'Pour reinforced base', minutes: 300, needs: [['groundworks_crew', 1]], cure: 0.7 },
  { kind: 'walls', name: 'Block retaining walls', minutes: 960, needs: [['groundworks_crew', 1]] },
  { kind: 'electrical_first_fix', name: 'Supply cable first fix', minutes: 240, needs: [['electrician', 1]] },
  { kind: 'delivery', name: 'Delivery', minutes: 120, needs: [['lorry', 1]] },
  { kind: 'lift', name: 'Crane lift into pit', minutes: 240, needs: [['crane', 1], ['install_crew', 1], ['pallet_truck', 2], ['rollers', 1]] },
  { kind: 'fill', name: 'Fill', minutes: 180, needs: [['install_crew', 1]] },
  { kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: [['electrician', 1]] },
  { kind: 'commission', name: 'Commission', minutes: 180, needs: [['install_crew', 1]] },
  { kind: 'handover', name: 'Handover', minutes: 60, needs: [['install_crew', 1]] },
];
const ON_SLAB: StagePlan[] = [
  { kind: 'survey', name: 'Site survey', minutes: 120, needs: [['install_crew', 1]] },
  { kind: 'base_pour', name: 'Pour slab', minutes: 360, needs: [['groundworks_crew', 1]], cure: 0.7 },
  { kind: 'electrical_first_fix', name: 'Supply cable first fix', minutes: 240, needs: [['electrician', 1]] },
  { kind: 'delivery', name: 'Delivery', minutes: 120, needs: [['lorry', 1]] },
  { kind: 'placement', name: 'Move into place', minutes: 180, needs: [['install_crew', 1], ['pallet_truck', 2]] },
  { kind: 'fill', name: 'Fill', minutes: 180, needs: [['install_crew', 1]] },
  { kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: [['electrician', 1]] },
  { kind: 'commission', name: 'Commission', minutes: 180, needs: [['install_crew', 1]] },
  { kind: 'handover', name: 'Handover', minutes: 60, needs: [['install_crew', 1]] },
];
/** [from, to, lag amount, lag unit]: the order of stages (base cures before the lift via its cure rule). */
const LINKS: [string, string, number, string][] = [
  ['survey', 'excavation', 0, 'working_days'], ['survey', 'base_pour', 0, 'working_days'],
  ['excavation', 'base_pour', 0, 'working_hours'], ['base_pour', 'walls', 1, 'elapsed_days'],
  ['survey', 'electrical_first_fix', 0, 'working_days'], ['walls', 'lift', 0, 'working_hours'],
  ['base_pour', 'lift', 0, 'working_hours'], ['base_pour', 'placement', 0, 'working_hours'],
  ['delivery', 'lift', 0, 'working_hours'], ['delivery', 'placement', 0, 'working_hours'],
  ['electrical_first_fix', 'lift', 0, 'working_hours'], ['electrical_first_fix', 'placement', 0, 'working_hours'],
  ['lift', 'fill', 0, 'working_hours'], ['placement', 'fill', 0, 'working_hours'],
  ['lift', 'electrical_connect', 0, 'working_hours'], ['placement', 'electrical_connect', 0, 'working_hours'],
  ['fill', 'commission', 0, 'working_hours'], ['electrical_connect', 'commission', 0, 'working_hours'],
  ['commission', 'handover', 0, 'working_hours'],
];

const CUSTOMERS = [
  ['Hannah Greaves', '14 Larch Rise', 'Otley', 'LS21 3QP'], ['Marcus Doyle', '2 The Paddocks', 'Ilkley', 'LS29 8RT'],
  ['Priti Shah', '77 Beechwood Road', 'Harrogate', 'HG2 0LX'], ['Owen Pritchard', 'Rose Cottage, Moor Lane', 'Pool-in-Wharfedale', 'LS21 1EH'],
  ['Grace Achebe', '9 Kingfisher Way', 'Wetherby', 'LS22 6XN'], ['Tomasz Nowak', '31 Station Road', 'Horsforth', 'LS18 5PA'],
  ['Ellie Fairburn', 'The Old Barn, Hall Lane', 'Bramhope', 'LS16 9AS'], ['Declan Murphy', '5 Willow Close', 'Knaresborough', 'HG5 0SD'],
  ['Sofia Rinaldi', '112 Park Avenue', 'Roundhay', 'LS8 2JH'], ['Jack Thornton', '18 Millbeck Green', 'Collingham', 'LS22 5AG'],
  ['Ruth Okonjo', '6 Heather View', 'Burley-in-Wharfedale', 'LS29 7DW'], ['Ian Castleford', 'Hillside Farm', 'Arthington', 'LS21 1PJ'],
  ['Mei Chen', '40 Orchard Drive', 'Adel', 'LS16 8BQ'], ['Liam Hebden', '3 Quarry Court', 'Menston', 'LS29 6NR'],
  ['Nadia Haddad', '21 Sycamore Lane', 'Boston Spa', 'LS23 6AY'], ['Colin Ashby', '8 Riverside Mews', 'Pannal', 'HG3 1JW'],
  ['Freya Lund', '56 Church Street', 'Bingley', 'BD16 2LE'], ['Kwame Mensah', '12 Acorn Grove', 'Shipley', 'BD18 4QT'],
  ['Holly Barraclough', 'Wren House, Back Lane', 'Spofforth', 'HG3 1AQ'], ['Arjun Kapoor', '27 Meadow Bank', 'Guiseley', 'LS20 9HD'],
  ['Beth Garside', '4 Foxglove Walk', 'Baildon', 'BD17 6TS'], ['Rory Mackintosh', '63 Grange Road', 'Alwoodley', 'LS17 7HF'],
  ['Zara Lindley', '10 Ash Tree Court', 'Yeadon', 'LS19 7SL'], ['Peter Hollings', '1 Lock Keepers Row', 'Rodley', 'LS13 1LQ'],
];

const DAY = 86_400_000;

/** Offset of Europe/London from UTC at an instant, in minutes. */
function londonOffset(utcMs: number): number {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', timeZoneName: 'shortOffset' }).formatToParts(new Date(utcMs));
  const name = parts.find((p) => p.type === 'timeZoneName')?.value ?? 'GMT';
  const m = /GMT([+-]\d+)?/.exec(name);
  return m?.[1] ? Number(m[1]) * 60 : 0;
}
/** The instant of `minutes` past local midnight on the London calendar day that starts near `dayUtc`. */
function londonAt(dayUtc: number, minutes: number): Date {
  const guess = dayUtc + minutes * 60_000;
  return new Date(guess - londonOffset(guess) * 60_000);
}
const isoDate = (ms: number) => new Date(ms).toISOString().slice(0, 10);

export interface SeedResult { skipped: boolean; jobs: number; bookings: number }

export async function seedDemo(knex: Knex, options: { today?: Date } = {}): Promise<SeedResult> {
  const existing = await knex('firms').where('name', FIRMS[0]!.name).first();
  if (existing) return { skipped: true, jobs: 0, bookings: 0 };
  const today = options.today ?? new Date();
  const day0 = Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate());

  return knex.transaction(async (trx) => {
    const firmId = new Map<string, string>();
    for (const f of FIRMS) {
      const [row] = await trx('firms').insert({ name: f.name, kind: f.kind, time_zone: 'Europe/London', holiday_region: f.region ?? 'GB-ENG', phone: f.phone }).returning('id');
      firmId.set(f.name, String(row.id));
    }
    const F = (name: string) => firmId.get(name)!;
    const tideway = F('Tideway Hot Tubs');
    const moorview = F('Moorview Spas');
    for (const partner of ['Fellside Crane Hire', 'Ridgeway Plant Hire', 'Brightspark Electrical', 'Northgate Electrical', 'Millstone Groundworks', 'Carrow Haulage']) {
      await trx('partnerships').insert({ installer_firm_id: tideway, partner_firm_id: F(partner) });
    }
    await trx('partnerships').insert({ installer_firm_id: moorview, partner_firm_id: F('Brightspark Electrical') });

    const calendarId = new Map<string, string>();
    for (const f of FIRMS) {
      const [row] = await trx('calendars').insert({ firm_id: F(f.name), name: 'Standard week', weekly_hours: JSON.stringify(WEEKDAYS_8_TO_5) }).returning('id');
      calendarId.set(f.name, String(row.id));
    }
    for (const f of ['Brightspark Electrical', 'Northgate Electrical']) {
      const [row] = await trx('calendars').insert({ firm_id: F(f), name: 'Electricians', weekly_hours: JSON.stringify(ELECTRICIAN_HOURS) }).returning('id');
      calendarId.set(`${f}/Electricians`, String(row.id));
    }

    const userId = new Map<string, string>();
    for (const a of DEMO_ACCOUNTS) {
      const [row] = await trx('users').insert({ email: a.email, name: a.name }).returning('id');
      userId.set(a.email, String(row.id));
      await trx('memberships').insert({ user_id: row.id, firm_id: F(a.firm), role: a.role });
    }

    const resourceId = new Map<string, string>();
    for (const r of RESOURCES) {
      const cal = r.calendar ? calendarId.get(`${r.firm}/${r.calendar}`) : calendarId.get(r.firm);
      const [row] = await trx('resources').insert({
        firm_id: F(r.firm), name: r.name, category: r.category, kind: r.kind, ownership: r.ownership ?? 'owned',
        calendar_id: cal, user_id: r.email ? userId.get(r.email) ?? null : null,
      }).returning('id');
      resourceId.set(r.name, String(row.id));
    }
    for (const r of RESOURCES) {
      for (const m of r.members ?? []) await trx('crew_members').insert({ crew_id: resourceId.get(r.name), person_id: resourceId.get(m) });
    }
    // An absence and a hire period with idle paid days, so the checks have something to say.
    await trx('calendar_exceptions').insert({ resource_id: resourceId.get('Tom Ashworth'), starts_at: londonAt(day0 + 9 * DAY, 0), ends_at: londonAt(day0 + 12 * DAY, 0), reason: 'Holiday' });
    await trx('hire_periods').insert({
      resource_id: resourceId.get('3 t excavator (hired)'), hirer_firm_id: tideway, supplier_firm_id: F('Ridgeway Plant Hire'),
      on_hire_at: londonAt(day0 + 2 * DAY, 420), off_hire_at: londonAt(day0 + 16 * DAY, 1080), day_rate_pence: 14500,
      delivery_pence: 6000, collection_pence: 6000, status: 'approved', approved_by: userId.get('maya.lindqvist@tideway.example'),
    });
    await trx('lead_time_rules').insert([
      { firm_id: tideway, resource_kind: 'crane', working_days: 5, counted_from: 'now' },
      { firm_id: tideway, resource_kind: 'electrician', working_days: 3, counted_from: 'now' },
      { firm_id: tideway, stage_kind: 'delivery', working_days: 15, counted_from: 'order' },
    ]);

    const unitIds: string[] = [];
    for (const u of UNITS) {
      const [row] = await trx('units').insert({
        firm_id: tideway, model: u.model, maker: u.maker, length_mm: u.lengthMm, width_mm: u.widthMm, height_mm: u.heightMm,
        dry_weight_kg: u.dryWeightKg, filled_weight_kg: u.filledWeightKg, water_litres: u.waterLitres,
        supplies: JSON.stringify(u.supplies), maker_lead_days: u.makerLeadDays,
      }).returning('id');
      unitIds.push(String(row.id));
    }

    // Resources by kind, handed out round-robin; a confirmed slot is only given where it is free.
    const byKind = new Map<string, string[]>();
    for (const r of RESOURCES.filter((x) => x.firm !== 'Moorview Spas')) {
      if (r.category === 'person' && r.kind === 'installer') continue;
      byKind.set(r.kind, [...(byKind.get(r.kind) ?? []), r.name]);
    }
    const confirmedBusy = new Map<string, [number, number][]>();
    const isFree = (res: string, s: number, e: number) => !(confirmedBusy.get(res) ?? []).some(([a, b]) => s < b && a < e);
    let jobs = 0;
    let bookings = 0;

    const workingDayFrom = (ms: number, add: number) => {
      let d = ms;
      let n = add;
      while (n > 0 || [0, 6].includes(new Date(d).getUTCDay())) {
        d += DAY;
        if (![0, 6].includes(new Date(d).getUTCDay())) n -= 1;
      }
      return d;
    };

    for (let i = 0; i < CUSTOMERS.length; i += 1) {
      const [customer, address, town, postcode] = CUSTOMERS[i]! as [string, string, string, string];
      const inGround = i % 3 !== 2;
      const plan = inGround ? IN_GROUND : ON_SLAB;
      const startOffset = -10 + Math.floor(i * 2.2); // work spreads from ten days ago over the next six weeks
      const promised = day0 + (startOffset + 24) * DAY;
      const status = i < 3 ? 'in_progress' : i < 12 ? 'planned' : i < 20 ? 'surveyed' : 'enquiry';
      const [job] = await trx('jobs').insert({
        firm_id: tideway, reference: `TW-${String(2401 + i)}`, customer_name: customer, customer_phone: `07700 900${String(100 + i)}`,
        customer_email: `${(customer ?? '').split(' ')[0]!.toLowerCase()}@home.example`, site_address: address, site_town: town, site_postcode: postcode,
        access_notes: i % 4 === 0 ? 'Side gate 900 mm wide; park on the drive' : 'Access across the lawn; no parking restrictions',
        unit_id: unitIds[i % unitIds.length], installation_type: inGround ? (i % 5 === 0 ? 'semi_recessed' : 'in_ground') : 'slab',
        status, promised_from: isoDate(promised), promised_to: isoDate(promised + 7 * DAY), ordered_on: isoDate(day0 + (startOffset - 20) * DAY),
      }).returning('id');
      jobs += 1;

      const stageId = new Map<string, string>();
      for (const [seq, s] of plan.entries()) {
        const [row] = await trx('stages').insert({
          job_id: job.id, kind: s.kind, name: s.name, sequence: seq + 1, duration_minutes: s.minutes,
          requirements: JSON.stringify(s.needs.map(([kind, count]) => ({ kind, count }))),
          cure: s.cure ? JSON.stringify({ targetFraction: s.cure }) : null,
        }).returning('id');
        stageId.set(s.kind, String(row.id));
      }
      for (const [from, to, amount, unit] of LINKS) {
        if (stageId.has(from) && stageId.has(to)) {
          await trx('dependencies').insert({ from_stage_id: stageId.get(from), to_stage_id: stageId.get(to), type: 'FS', lag_amount: amount, lag_unit: unit });
        }
      }

      // The first sixteen jobs are booked (fully or partly); the rest wait in the tray.
      if (i >= 16) continue;
      let cursor = workingDayFrom(day0 + startOffset * DAY, 0);
      const stagesToBook = i < 12 ? plan.length : 3;
      for (const s of plan.slice(0, stagesToBook)) {
        const days = Math.max(1, Math.ceil(s.minutes / 540));
        const start = londonAt(cursor, 480).getTime();
        const end = days === 1 ? start + s.minutes * 60_000 : londonAt(workingDayFrom(cursor, days - 1), 480 + s.minutes - (days - 1) * 540).getTime();
        const past = end < today.getTime();
        const wanted = past ? 'done' : start < today.getTime() ? 'on_site' : i < 8 ? 'confirmed' : i % 2 ? 'sent' : 'pencilled';
        for (const [kind, count] of s.needs) {
          const pool = byKind.get(kind) ?? [];
          for (let c = 0; c < count; c += 1) {
            const res = pool[(i + c) % pool.length];
            if (!res) continue;
            const state = wanted === 'confirmed' && !isFree(res, start, end) ? 'pencilled' : wanted;
            if (state === 'confirmed') confirmedBusy.set(res, [...(confirmedBusy.get(res) ?? []), [start, end]]);
            await trx('bookings').insert({ stage_id: stageId.get(s.kind), resource_id: resourceId.get(res), starts_at: new Date(start), ends_at: new Date(end), state, created_by: userId.get('sam.okafor@tideway.example') });
            bookings += 1;
          }
        }
        // Curing runs a week before the lift; the other stages follow on the next working day.
        cursor = workingDayFrom(cursor, s.kind === 'base_pour' ? 6 : days);
      }
    }

    // Moorview's own job shares Brightspark's electrician: the cross-firm check has a case to find.
    const [mvJob] = await trx('jobs').insert({ firm_id: moorview, reference: 'MV-118', customer_name: 'Alan Frost', site_address: '22 Valley Drive', site_town: 'Harrogate', site_postcode: 'HG2 0JS', installation_type: 'slab', status: 'planned', promised_from: isoDate(day0 + 10 * DAY), promised_to: isoDate(day0 + 14 * DAY) }).returning('id');
    const [mvStage] = await trx('stages').insert({ job_id: mvJob.id, kind: 'electrical_connect', name: 'Connect and certify', sequence: 1, duration_minutes: 240, requirements: JSON.stringify([{ kind: 'electrician', count: 1 }]) }).returning('id');
    const mvStart = londonAt(workingDayFrom(day0 + 7 * DAY, 0), 540);
    await trx('bookings').insert({ stage_id: mvStage.id, resource_id: resourceId.get('Priya Nair'), starts_at: mvStart, ends_at: new Date(mvStart.getTime() + 4 * 3_600_000), state: 'sent' });
    jobs += 1;
    bookings += 1;
    return { skipped: false, jobs, bookings };
  });
}
