import type { Knex } from 'knex';
import { DEMO_ACCOUNTS } from './demo-accounts.ts';
import { DEFAULT_TEMPLATES } from '../shared/templates/defaults.ts';
import { planFromTemplate } from '../shared/templates/plan.ts';
import { jobQuantities, type InstallationType } from '../shared/quantities/job-quantities.ts';
import { DEFAULT_QUANTITY_SETTINGS } from '../shared/quantities/settings.ts';

/**
 * The demo scenario (all names invented): one installer with three crews and its own and hired
 * plant, its partner firms, a second installer sharing one electrical firm, and 24 jobs over the
 * coming six weeks at different stages. Dates are relative to `today`, so the board is always live.
 */

type Firm = { name: string; kind: string; region?: string; phone: string; email?: string };
const FIRMS: Firm[] = [
  { name: 'Tideway Hot Tubs', kind: 'installer', phone: '0113 496 0001' },
  { name: 'Moorview Spas', kind: 'installer', phone: '01423 496 002' },
  { name: 'Fellside Crane Hire', kind: 'crane_hire', phone: '0113 496 0101', email: 'bookings@fellside.example' },
  { name: 'Ridgeway Plant Hire', kind: 'plant_hire', phone: '0113 496 0102', email: 'bookings@ridgeway.example' },
  { name: 'Brightspark Electrical', kind: 'electrical', phone: '0113 496 0103', email: 'bookings@brightspark.example' },
  { name: 'Northgate Electrical', kind: 'electrical', phone: '0113 496 0104', email: 'bookings@northgate.example' },
  { name: 'Millstone Groundworks', kind: 'groundworks', phone: '0113 496 0105', email: 'bookings@millstone.example' },
  { name: 'Carrow Haulage', kind: 'haulage', phone: '0113 496 0106', email: 'bookings@carrow.example' },
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

// Stages come from the same templates a firm plans its jobs with (shared/templates), for the
// installation type, the unit and the survey's crane decision.
const GROUND_TYPES = ['clay', 'loam', 'sand_gravel'] as const;

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
      const [row] = await trx('firms').insert({ name: f.name, kind: f.kind, time_zone: 'Europe/London', holiday_region: f.region ?? 'GB-ENG', phone: f.phone, email: f.email ?? null }).returning('id');
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
      const installationType: InstallationType = inGround ? (i % 5 === 0 ? 'semi_recessed' : 'in_ground') : 'slab';
      const unit = UNITS[i % UNITS.length]!;
      const startOffset = -10 + Math.floor(i * 2.2); // work spreads from ten days ago over the next six weeks
      const promised = day0 + (startOffset + 24) * DAY;
      const status = i < 3 ? 'in_progress' : i < 12 ? 'planned' : i < 20 ? 'surveyed' : 'enquiry';
      const [job] = await trx('jobs').insert({
        firm_id: tideway, reference: `TW-${String(2401 + i)}`, customer_name: customer, customer_phone: `07700 900${String(100 + i)}`,
        customer_email: `${(customer ?? '').split(' ')[0]!.toLowerCase()}@home.example`, site_address: address, site_town: town, site_postcode: postcode,
        access_notes: i % 4 === 0 ? 'Side gate 900 mm wide; park on the drive' : 'Access across the lawn; no parking restrictions',
        unit_id: unitIds[i % unitIds.length], installation_type: installationType,
        status, promised_from: isoDate(promised), promised_to: isoDate(promised + 7 * DAY), ordered_on: isoDate(day0 + (startOffset - 20) * DAY),
      }).returning('id');
      jobs += 1;

      // Jobs past the enquiry have a survey; a side gate makes the narrow routes.
      const survey = status === 'enquiry' ? null : {
        accessWidthMm: i % 4 === 0 ? 900 : 1200, accessHeightMm: i % 4 === 0 ? 2100 : null, steps: i % 3, gates: i % 4 === 0 ? 1 : 0,
        overheadObstructions: i % 7 === 3, overheadNotes: i % 7 === 3 ? 'Telephone line crosses the garden at about 5 m' : null,
        groundType: GROUND_TYPES[i % GROUND_TYPES.length]!, buriedServicesNotes: 'Water supply pipe runs under the drive (deeds plan); scan before digging',
        craneStandingPosition: 'On the drive, outriggers on spreader mats', craneDistanceToSetDownM: 8 + (i % 5), consumerUnitDistanceM: 12 + i,
        mainFuseAmps: [60, 80, 100][i % 3]!, drainage: 'Soakaway at the foot of the garden', craneRequired: null, excavatorSize: null, notes: null,
      };
      if (survey) {
        await trx('surveys').insert({ job_id: job.id, ...Object.fromEntries(Object.entries(survey).map(([k, v]) => [k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`), v])),
          surveyed_by: userId.get('connor.reid@tideway.example'), surveyed_at: londonAt(day0 + (startOffset - 14) * DAY, 600) });
      }
      const q = jobQuantities({ installationType, unit, survey, settings: DEFAULT_QUANTITY_SETTINGS });
      const plan = planFromTemplate(DEFAULT_TEMPLATES[installationType], {
        craneNeeded: q.crane.result.needed, excavationMinutes: q.excavationTime?.result.minutes ?? null, makerLeadDays: unit.makerLeadDays,
      }).stages;
      const links = planFromTemplate(DEFAULT_TEMPLATES[installationType], { craneNeeded: q.crane.result.needed, excavationMinutes: null }).links;

      const stageId = new Map<string, string>();
      for (const s of plan) {
        const [row] = await trx('stages').insert({
          job_id: job.id, kind: s.kind, name: s.name, sequence: s.sequence, duration_minutes: s.durationMinutes,
          requirements: JSON.stringify(s.requirements), cure: s.cure ? JSON.stringify(s.cure) : null,
          notes: s.kind === 'lift' || s.kind === 'placement' ? q.crane.result.reason : null,
        }).returning('id');
        stageId.set(s.kind, String(row.id));
      }
      for (const l of links) {
        await trx('dependencies').insert({ from_stage_id: stageId.get(l.fromKind), to_stage_id: stageId.get(l.toKind), type: l.type, lag_amount: l.lagAmount, lag_unit: l.lagUnit });
      }

      // The first sixteen jobs are booked (fully or partly); the rest wait in the tray.
      if (i >= 16) continue;
      let cursor = workingDayFrom(day0 + startOffset * DAY, 0);
      const stagesToBook = i < 12 ? plan.length : 3;
      for (const s of plan.slice(0, stagesToBook)) {
        const days = Math.max(1, Math.ceil(s.durationMinutes / 540));
        const start = londonAt(cursor, 480).getTime();
        const end = days === 1 ? start + s.durationMinutes * 60_000 : londonAt(workingDayFrom(cursor, days - 1), 480 + s.durationMinutes - (days - 1) * 540).getTime();
        const past = end < today.getTime();
        const wanted = past ? 'done' : start < today.getTime() ? 'on_site' : i < 8 ? 'confirmed' : i % 2 ? 'sent' : 'pencilled';
        for (const { kind, count } of s.requirements) {
          const pool = byKind.get(kind) ?? [];
          for (let c = 0; c < count; c += 1) {
            const res = pool[(i + c) % pool.length];
            if (!res) continue;
            // Confirmed and on-site bookings hold their resource: the database refuses two at once.
            const held = wanted === 'confirmed' || wanted === 'on_site';
            const state = held && !isFree(res, start, end) ? 'pencilled' : wanted;
            if (state === 'confirmed' || state === 'on_site') confirmedBusy.set(res, [...(confirmedBusy.get(res) ?? []), [start, end]]);
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
