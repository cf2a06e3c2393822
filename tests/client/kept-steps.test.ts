import { afterEach, describe, expect, it, vi } from 'vitest';
import { createApp, effectScope } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createPinia, setActivePinia } from 'pinia';
import {
  asKept,
  keepMark,
  keptOnThisPhone,
  markStore,
  pageStore,
  type KeptMark,
} from '@/components/my-work/kept-marks';
import { useMyWork } from '@/composables/useMyWork';
import { useKeptStepsElsewhere } from '@/composables/useKeptSteps';
import { useSessionStore } from '@/stores/session';
import { ApiError } from '@/api/client';
import type { MyWorkItem, MyWorkList } from '@shared/schemas/my-work';
import { stubFetch, type SentRequest } from './fake-fetch';

afterEach(() => {
  vi.unstubAllGlobals();
});

/** Lets the fake fetch answer and Vue's watchers run (polled, not a fixed sleep). */
async function until(check: () => boolean): Promise<void> {
  for (let i = 0; i < 200 && !check(); i++) await new Promise((resolve) => setTimeout(resolve, 0));
  expect(check()).toBe(true);
}

// A Monday morning dig, the test's own; the phone's clock at 09:30 BST that day.
const MARKED = Date.parse('2026-06-01T08:30:00Z');
let clock = MARKED;
const dig: MyWorkItem = {
  bookingId: '41',
  version: 3,
  startsAt: '2026-06-01T07:00:00Z',
  endsAt: '2026-06-01T11:00:00Z',
  state: 'confirmed',
  side: 'own',
  day: '2026-06-01',
  actions: ['arrive'],
  resource: { id: '7', name: 'Crew Heron', kind: 'install_crew', category: 'crew', firmName: 'Tideway Hot Tubs' },
  stage: { id: 's41', kind: 'excavation', name: 'Excavate pit' },
  job: { id: '12', reference: 'TW-2407', unitName: null, installationType: 'in_ground', unitFacing: null },
  site: { address: 'The Old Barn, Hall Lane', town: 'Bramhope', postcode: 'LS16 9AS', accessNotes: null },
  contacts: [],
  alongside: [],
  cautions: [],
  unitArrives: null,
} as MyWorkItem;
const list: MyWorkList = { today: '2026-06-01', timeZone: 'Europe/London', items: [dig], away: [], hours: [] };
const step = (action: KeptMark['action'], version = 3): KeptMark => ({
  bookingId: '41',
  action,
  version,
  markedAt: new Date(MARKED).toISOString(),
  label: 'Excavate pit · TW-2407',
});

/** The browser's storage as far as kept steps use it, with what it holds to look at. */
function memoryStorage(): { items: Map<string, string>; storage: Storage } {
  const items = new Map<string, string>();
  const storage = {
    getItem: (k: string) => items.get(k) ?? null,
    setItem: (k: string, v: string) => void items.set(k, v),
    removeItem: (k: string) => void items.delete(k),
  } as Storage;
  return { items, storage };
}

describe('steps kept on the phone', () => {
  it('go in order, each one version on from the last kept for its booking; taking one back cancels it', () => {
    const arrived = keepMark([], step('arrive'));
    const done = keepMark(arrived, step('finish'));
    expect(done.map((m) => [m.action, m.version])).toEqual([
      ['arrive', 3],
      ['finish', 4],
    ]);
    // "Not done yet" before anything was sent: nothing need go for either.
    expect(keepMark(done, step('undo-finish')).map((m) => m.action)).toEqual(['arrive']);
    expect(keepMark(arrived, step('undo-arrive'))).toEqual([]);
    // Another booking's steps keep their own versions.
    expect(keepMark(arrived, { ...step('arrive', 9), bookingId: '42' }).map((m) => m.version)).toEqual([3, 9]);
  });

  it('show the card as it will be once sent, by the same rule the server lists the buttons', () => {
    const onSite = asKept(dig, [step('arrive')], list);
    expect([onSite.state, onSite.actions]).toEqual(['on_site', ['finish', 'undo-arrive']]);
    const done = asKept(dig, keepMark([step('arrive')], step('finish')), list);
    expect([done.state, done.actions]).toEqual(['done', ['undo-finish']]);
    // A partner firm's crew member marks done but not on site (the installer's office marks that).
    const theirs = asKept({ ...dig, state: 'on_site', side: 'partner' }, [step('undo-arrive')], list);
    expect([theirs.state, theirs.actions]).toEqual(['confirmed', []]);
    expect(asKept(dig, [], list)).toBe(dig);
  });

  it("are each person's own in the browser's storage, and what can't be read counts as none", () => {
    const { items, storage } = memoryStorage();
    const connor = markStore(storage, '5', '1');
    expect(connor.write([step('arrive')])).toBe(true);
    expect(connor.read()).toEqual([step('arrive')]);
    expect(markStore(storage, '6', '1').read()).toEqual([]);
    // Nothing of the householder's goes on the phone.
    expect([...items.values()].join()).not.toMatch(/Old Barn|Bramhope|LS16/);
    items.set('waterline:kept-steps:1:5', '{not json');
    expect(connor.read()).toEqual([]);
    items.set('waterline:kept-steps:1:5', JSON.stringify([step('arrive'), { bookingId: 41, action: 'fly' }]));
    expect(connor.read()).toEqual([step('arrive')]);
    expect(connor.write([])).toBe(true);
    expect(items.size).toBe(0);
    const full = {
      ...storage,
      setItem: () => {
        throw new Error('QuotaExceededError');
      },
    } as Storage;
    expect(markStore(full, '5', '1').write([step('arrive')])).toBe(false);
  });
});

describe('the count the waiting page gives', () => {
  it("adds up every person's kept steps on the phone, and nothing else stored", () => {
    // One entry that can't be read hides none of the others.
    const items = new Map<string, string>([
      ['waterline:kept-steps:1:6', '{broken'],
      ['waterline:kept-steps:1:5', JSON.stringify([step('arrive'), step('finish', 4)])],
      ['waterline:something-else', JSON.stringify([step('arrive')])],
      ['waterline:kept-steps:2:9', JSON.stringify([step('arrive')])],
    ]);
    const storage = {
      get length() {
        return items.size;
      },
      key: (i: number) => [...items.keys()][i] ?? null,
      getItem: (k: string) => items.get(k) ?? null,
    } as Storage;
    expect(keptOnThisPhone(storage)).toBe(3);
    expect(keptOnThisPhone(undefined)).toBe(0);
  });
});

describe('marking a step without a signal', () => {
  afterEach(() => {
    clock = MARKED;
  });
  function work(answer: (r: SentRequest) => { status: number; body?: unknown }, store = pageStore()) {
    const sent = stubFetch(answer);
    const said: string[] = [];
    const undos: (() => Promise<void>)[] = [];
    const problems: unknown[] = [];
    const scope = effectScope();
    const w = scope.run(() =>
      useMyWork(
        {
          confirm: async () => true,
          announce: (text, undo) => {
            said.push(text);
            if (undo) undos.push(undo);
          },
          problem: (e) => problems.push(e),
        },
        { store, now: () => clock },
      ),
    )!;
    const posts = () => sent.filter((r) => r.method === 'POST').map((r) => r.body);
    return { w, sent, said, undos, problems, posts, store, stop: () => scope.stop() };
  }

  it('keeps the step with the time it was marked, shows it marked, and sends it in order once there is a signal', async () => {
    let signal = false;
    let version = 3;
    const t = work((r) => {
      if (!signal && r.method === 'POST') throw new TypeError('Failed to fetch');
      if (r.method === 'GET') return { status: 200, body: list };
      version++;
      return { status: 200, body: { id: '41', state: 'on_site', version } };
    });
    await until(() => t.w.groups.value.length === 1);
    expect(await t.w.mark(t.w.groups.value[0]!.items[0]!, 'arrive')).toBe(true);
    expect(t.said).toEqual(['No signal: Excavate pit marked on site on this phone, sent when there is a signal']);
    const card = () => t.w.groups.value[0]!.items[0]!;
    expect([card().state, card().actions]).toEqual(['on_site', ['finish', 'undo-arrive']]);
    expect(t.w.keptSince('41')).toBe('2026-06-01T08:30:00.000Z');
    // Done, marked next: kept behind the first without trying the server.
    const tried = t.posts().length;
    expect(await t.w.mark(card(), 'finish')).toBe(true);
    expect(t.posts()).toHaveLength(tried);
    expect(t.store.read().map((m) => [m.action, m.version])).toEqual([
      ['arrive', 3],
      ['finish', 4],
    ]);

    await t.w.sendKept(); // still no signal: both stay, nothing said unless asked
    expect(t.store.read()).toHaveLength(2);
    expect(t.problems).toEqual([]);
    await t.w.sendKept({ sayNoSignal: true }); // Send now
    expect((t.problems as ApiError[]).map((p) => [p.status, p.title])).toEqual([
      [0, 'Waterline could not reach the server'],
    ]);
    t.problems.length = 0;

    // The signal back 25 minutes on: each goes with how long ago it was marked.
    signal = true;
    clock = MARKED + 25 * 60_000;
    await t.w.sendKept();
    expect(t.posts().slice(-2)).toEqual([
      { action: 'arrive', version: 3, markedMsAgo: 1_500_000 },
      { action: 'finish', version: 4, markedMsAgo: 1_500_000 },
    ]);
    expect(t.store.read()).toEqual([]);
    expect(t.w.keptSince('41')).toBeNull();
    expect(t.said.at(-1)).toBe('Sent 2 steps kept on this phone');
    expect(t.problems).toEqual([]);
    t.stop();
  });

  it("takes a kept step back with the announcement's Undo, sending nothing", async () => {
    const t = work((r) => {
      if (r.method === 'POST') throw new TypeError('Failed to fetch');
      return { status: 200, body: list };
    });
    await until(() => t.w.groups.value.length === 1);
    await t.w.mark(t.w.groups.value[0]!.items[0]!, 'arrive');
    await t.undos[0]!();
    expect(t.store.read()).toEqual([]);
    expect(t.w.groups.value[0]!.items[0]!.state).toBe('confirmed');
    expect(t.said.at(-1)).toBe('Excavate pit: no longer on site');
    expect(t.posts()).toEqual([{ action: 'arrive', version: 3 }]);
    t.stop();
  });

  it('takes the step back on the server when the Undo comes after the kept step has gone', async () => {
    let signal = false;
    let gets = 0;
    const onSite = { ...list, items: [{ ...dig, state: 'on_site', version: 4, actions: ['finish', 'undo-arrive'] }] };
    const t = work((r) => {
      if (!signal && r.method === 'POST') throw new TypeError('Failed to fetch');
      if (r.method === 'GET') return { status: 200, body: gets++ === 0 ? list : onSite };
      return {
        status: 200,
        body: {
          id: '41',
          state: (r.body as { action: string }).action === 'arrive' ? 'on_site' : 'confirmed',
          version: 5,
        },
      };
    });
    await until(() => t.w.groups.value.length === 1);
    await t.w.mark(t.w.groups.value[0]!.items[0]!, 'arrive');
    signal = true;
    await t.w.sendKept();
    await t.undos[0]!();
    expect(t.posts().slice(-2)).toEqual([
      { action: 'arrive', version: 3, markedMsAgo: 0 },
      { action: 'undo-arrive', version: 4 },
    ]);
    expect(t.store.read()).toEqual([]);
    expect(t.said.at(-1)).toBe('Excavate pit: no longer on site');
    t.stop();
  });

  it('says a refusal with the step it was about, and drops that booking’s kept steps', async () => {
    const store = pageStore();
    store.write([step('arrive'), step('finish', 4)]);
    const t = work(
      (r) =>
        r.method === 'GET'
          ? { status: 200, body: list }
          : {
              status: 409,
              body: { title: 'This booking was changed since you loaded it', detail: 'Moved to Tuesday.' },
            },
      store,
    );
    // Kept from an earlier visit: tried as soon as the list has come.
    await until(() => t.problems.length === 1);
    const problem = t.problems[0] as ApiError;
    expect([problem.status, problem.title, problem.detail]).toEqual([
      409,
      'Not sent: Excavate pit · TW-2407, marked on site',
      'Moved to Tuesday.',
    ]);
    expect(t.posts()).toHaveLength(1);
    expect(t.store.read()).toEqual([]);
    t.stop();
  });

  it('counts a step as sent when its first try reached the server and only the answer was lost', async () => {
    const store = pageStore();
    store.write([step('arrive')]);
    let gets = 0;
    const onSite = { ...list, items: [{ ...dig, state: 'on_site', version: 4, actions: ['finish', 'undo-arrive'] }] };
    const t = work(
      (r) =>
        r.method === 'GET'
          ? { status: 200, body: gets++ === 0 ? list : onSite }
          : { status: 409, body: { title: 'This booking was changed since you loaded it' } },
      store,
    );
    await until(() => t.said.length === 1);
    expect(t.said).toEqual(['Sent 1 step kept on this phone']);
    expect(t.problems).toEqual([]);
    t.stop();
  });
});

describe('kept steps with two pages of one tab open (My work, and the sender other pages run)', () => {
  afterEach(() => {
    clock = MARKED;
  });

  it('are sent once, in order, by one page at a time; a step kept meanwhile is not lost, and My work shows them sent', async () => {
    const { storage } = memoryStorage();
    const store = () => markStore(storage, '5', '1');
    let signal = false;
    let release: (() => void) | undefined;
    let gets = 0;
    const sent = stubFetch(async (r) => {
      if (r.method === 'GET') {
        gets++;
        return { status: 200, body: list };
      }
      if (!signal) throw new TypeError('Failed to fetch');
      // The first step's answer is held until the test lets it go.
      if ((r.body as { action: string }).action === 'arrive') await new Promise<void>((go) => (release = go));
      return { status: 200, body: { id: '41', state: 'on_site', version: 4 } };
    });
    const prompts = (said: string[]) => ({
      confirm: async () => true,
      announce: (text: string) => void said.push(text),
      problem: (e: unknown) => {
        throw e;
      },
    });
    const myWorkSaid: string[] = [];
    const elsewhereSaid: string[] = [];
    const scope = effectScope();
    const [myWork, elsewhere] = scope.run(() => [
      useMyWork(prompts(myWorkSaid), { store: store(), now: () => clock }),
      useMyWork(prompts(elsewhereSaid), { store: store(), now: () => clock }),
    ])!;
    await until(() => myWork.groups.value.length === 1 && elsewhere.list.data.value !== null);
    expect(await myWork.mark(myWork.groups.value[0]!.items[0]!, 'arrive')).toBe(true);
    expect(
      store()
        .read()
        .map((m) => m.action),
    ).toEqual(['arrive']);

    signal = true;
    const sending = elsewhere.sendKept();
    await until(() => release !== undefined);
    // While one page sends, the other sends nothing of its own.
    await myWork.sendKept();
    // Done, marked on My work while the first step is on its way: kept behind it.
    const card = myWork.groups.value[0]!.items[0]!;
    expect(await myWork.mark(card, 'finish')).toBe(true);
    expect(
      store()
        .read()
        .map((m) => [m.action, m.version]),
    ).toEqual([
      ['arrive', 3],
      ['finish', 4],
    ]);
    const getsBefore = gets;
    release!();
    await sending;
    const posts = sent.filter((r) => r.method === 'POST').map((r) => r.body);
    expect(posts).toEqual([
      { action: 'arrive', version: 3 },
      { action: 'arrive', version: 3, markedMsAgo: 0 },
      { action: 'finish', version: 4, markedMsAgo: 0 },
    ]);
    expect(store().read()).toEqual([]);
    expect(elsewhereSaid).toEqual(['Sent 2 steps kept on this phone']);
    // My work no longer shows them kept, and asked where the booking stands now.
    await until(() => myWork.kept.value.length === 0 && gets > getsBefore + 1);
    expect(myWork.keptSince('41')).toBeNull();
    scope.stop();
  });
});

describe('a page that goes while it sends kept steps', () => {
  it('sends nothing more than the step under way, and the rest stay kept', async () => {
    const { storage } = memoryStorage();
    const store = markStore(storage, '5', '1');
    store.write([step('arrive'), { ...step('arrive'), bookingId: '42' }]);
    let release: (() => void) | undefined;
    const sent = stubFetch(async (r) => {
      if (r.method === 'GET') return { status: 200, body: list };
      await new Promise<void>((go) => (release = go));
      return { status: 200, body: { id: '41', state: 'on_site', version: 4 } };
    });
    const scope = effectScope();
    const w = scope.run(() =>
      useMyWork({ confirm: async () => true, announce: () => {}, problem: () => {} }, { store, now: () => clock }),
    )!;
    // Kept from an earlier visit: sent once the list has come; the first answer is held.
    await until(() => release !== undefined);
    // Another page opened (or another person signed in): this one's scope ends mid-send.
    scope.stop();
    release!();
    await until(() => !w.sending.value);
    expect(sent.filter((r) => r.method === 'POST').map((r) => r.url)).toEqual(['/api/bookings/41/progress']);
    expect(store.read().map((m) => m.bookingId)).toEqual(['42']);
  });
});

describe('the sender other pages run, when the person switches firm', () => {
  it("sends the new firm's kept steps under its session, and leaves the old firm's kept", async () => {
    const { storage } = memoryStorage();
    vi.stubGlobal('localStorage', storage);
    // Connor keeps a step in each of his two firms (booking 41 in firm 1, 42 in firm 2).
    markStore(storage, '5', '1').write([step('arrive')]);
    markStore(storage, '5', '2').write([{ ...step('arrive'), bookingId: '42' }]);
    const sessionOf = (firmId: string) => ({
      user: { id: '5', name: 'Connor Reid', email: 'connor.reid@tideway.example' },
      firm: { id: firmId, name: `Firm ${firmId}`, kind: 'installer', timeZone: 'Europe/London' },
      role: 'crew',
      memberships: [],
      csrfToken: 'token',
    });
    let signal = false;
    let activeFirm = '1';
    /** Each step sent, with the firm whose session it went under. */
    const under: string[] = [];
    stubFetch((r) => {
      if (r.url === '/api/session') return { status: 200, body: sessionOf(activeFirm) };
      if (r.url === '/api/session/firm') {
        activeFirm = (r.body as { firmId: string }).firmId;
        return { status: 200, body: sessionOf(activeFirm) };
      }
      if (!signal) throw new TypeError('Failed to fetch');
      if (r.method === 'GET') return { status: 200, body: { ...list, items: [dig, { ...dig, bookingId: '42' }] } };
      under.push(`${r.url.split('/')[3]} as firm ${activeFirm}`);
      return { status: 200, body: { id: r.url.split('/')[3], state: 'on_site', version: 4 } };
    });
    const pinia = createPinia();
    setActivePinia(pinia);
    const router = createRouter({ history: createMemoryHistory(), routes: [{ path: '/:any(.*)*', component: {} }] });
    await router.push('/board');
    const app = createApp({}).use(pinia).use(router);
    const session = useSessionStore();
    await session.load();
    const said: string[] = [];
    const scope = effectScope();
    const elsewhere = app.runWithContext(() =>
      scope.run(() => useKeptStepsElsewhere({ announce: (text) => void said.push(text), problem: () => {} })),
    )!;
    expect(elsewhere.waiting.value).toBe(1);

    // Firm 2 chosen while there is no signal; then the signal comes back and he taps Send now.
    await session.switchFirm('2');
    await until(() => elsewhere.waiting.value === 1);
    signal = true;
    await elsewhere.sendNow();
    await until(() => under.length === 1 && !elsewhere.sending.value);
    expect(under).toEqual(['42 as firm 2']);
    expect(markStore(storage, '5', '2').read()).toEqual([]);
    // Firm 1's step waits for firm 1's session.
    expect(
      markStore(storage, '5', '1')
        .read()
        .map((m) => m.bookingId),
    ).toEqual(['41']);
    scope.stop();
  });
});
