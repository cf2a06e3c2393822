/**
 * The generated 300-resource board the board and API benchmarks share: one installer, ten partner
 * firms, 300 resources and 3,000 bookings across four weeks from {@link START}, and a signed-in
 * session made through the fake sign-in provider, as the tests do.
 */
import type { Knex } from 'knex';
import type { Express } from 'express';
import request from 'supertest';
import { emptySeededTables } from '../seeds/demo.ts';

export const RESOURCES = 300;
export const BOOKINGS = 3000;
export const DAY = 86_400_000;
export const START = Date.UTC(2027, 1, 1, 8); // Monday 1 February 2027, 08:00 GMT
const WEEKDAYS = JSON.stringify({
  1: [[480, 1020]],
  2: [[480, 1020]],
  3: [[480, 1020]],
  4: [[480, 1020]],
  5: [[480, 1020]],
});

export const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))]!;
};

export async function generate(knex: Knex): Promise<{ email: string }> {
  await emptySeededTables(knex);
  const [installer] = await knex('firms').insert({ name: 'Bench Installer', kind: 'installer' }).returning('id');
  const partnerIds: string[] = [];
  for (let p = 0; p < 10; p += 1) {
    const [row] = await knex('firms')
      .insert({ name: `Bench Partner ${p}`, kind: p % 2 ? 'electrical' : 'plant_hire' })
      .returning('id');
    partnerIds.push(row.id);
    await knex('partnerships').insert({ installer_firm_id: installer.id, partner_firm_id: row.id });
  }
  const firmIds = [installer.id, ...partnerIds];
  const calendars = new Map<string, string>();
  for (const f of firmIds) {
    const [c] = await knex('calendars')
      .insert({ firm_id: f, name: 'Standard week', weekly_hours: WEEKDAYS })
      .returning('id');
    calendars.set(String(f), c.id);
  }
  const [user] = await knex('users')
    .insert({ email: 'bench.scheduler@bench.example', name: 'Bench Scheduler' })
    .returning('id');
  await knex('memberships').insert({ user_id: user.id, firm_id: installer.id, role: 'scheduler' });
  const kinds = ['install_crew', 'excavator', 'pallet_truck', 'electrician', 'crane'];
  const resources = Array.from({ length: RESOURCES }, (_, i) => {
    const firm = i < 150 ? installer.id : partnerIds[i % partnerIds.length];
    const kind = kinds[i % kinds.length]!;
    return {
      firm_id: firm,
      name: `Resource ${String(i).padStart(3, '0')}`,
      category: kind === 'install_crew' ? 'crew' : kind === 'electrician' ? 'person' : 'machine',
      kind,
      calendar_id: calendars.get(String(firm)),
    };
  });
  const resourceRows = await knex('resources').insert(resources).returning(['id', 'kind']);
  const jobRows = await knex('jobs')
    .insert(
      Array.from({ length: BOOKINGS / 5 }, (_, j) => ({
        firm_id: installer.id,
        reference: `B-${j}`,
        customer_name: `Customer ${j}`,
        site_address: `${j} Bench Road`,
        site_town: 'Benchley',
        site_postcode: 'LS1 4AP',
        installation_type: 'in_ground',
        status: 'planned',
      })),
    )
    .returning('id');
  const stageRows = await knex('stages')
    .insert(
      jobRows.flatMap((job, j) =>
        kinds
          .map((kind, k) => ({
            job_id: job.id,
            kind: ['excavation', 'base_pour', 'delivery', 'electrical_connect', 'lift'][k],
            name: `Stage ${k + 1}`,
            sequence: k + 1,
            duration_minutes: 240,
            requirements: JSON.stringify([{ kind, count: 1 }]),
            _j: j,
          }))
          .map(({ _j, ...s }) => s),
      ),
    )
    .returning(['id', 'job_id']);
  const deps = [];
  // Rows come back camel-cased (knexSnakeCaseMappers): stages follow each other within their own job only.
  for (let i = 1; i < stageRows.length; i += 1)
    if (stageRows[i]!.jobId === stageRows[i - 1]!.jobId)
      deps.push({ from_stage_id: stageRows[i - 1]!.id, to_stage_id: stageRows[i]!.id, type: 'FS' });
  for (let i = 0; i < deps.length; i += 500) await knex('dependencies').insert(deps.slice(i, i + 500));
  // Each resource gets ten 4-hour bookings on its own working days across the four weeks.
  const byKind = new Map<string, string[]>();
  for (const r of resourceRows) byKind.set(r.kind, [...(byKind.get(r.kind) ?? []), r.id]);
  const bookings = stageRows.map((s, i) => {
    const kind = kinds[i % kinds.length]!;
    const pool = byKind.get(kind)!;
    const resource = pool[Math.floor(i / kinds.length) % pool.length]!;
    const slot = Math.floor(Math.floor(i / kinds.length) / pool.length);
    const week = Math.floor((slot * 2) / 5);
    const day = ((slot * 2) % 5) + week * 7 + (i % 2);
    const start = START + day * DAY;
    return {
      stage_id: s.id,
      resource_id: resource,
      starts_at: new Date(start),
      ends_at: new Date(start + 4 * 3_600_000),
      state: 'pencilled',
    };
  });
  for (let i = 0; i < bookings.length; i += 500) await knex('bookings').insert(bookings.slice(i, i + 500));
  return { email: 'bench.scheduler@bench.example' };
}

/** Signs in through the fake provider; returns the session cookie and the session's CSRF token. */
export async function signInCookie(app: Express, email: string): Promise<{ cookie: string; csrf: string }> {
  const agent = request.agent(app);
  const start = await agent.get('/auth/google').expect(302);
  const pick = new URL(start.headers.location as string);
  const authorize = new URL('/authorize', pick.origin);
  pick.searchParams.forEach((v, k) => authorize.searchParams.set(k, v));
  authorize.searchParams.set('login_hint', email);
  const back = new URL((await fetch(authorize, { redirect: 'manual' })).headers.get('location')!);
  const signedIn = await agent.get(back.pathname + back.search);
  const cookie = String(signedIn.headers['set-cookie']).split(';')[0]!;
  const session = await agent.get('/api/session').expect(200);
  return { cookie, csrf: String(session.body.csrfToken) };
}
