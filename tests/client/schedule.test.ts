import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { flushPromises, mount } from '@vue/test-utils';
import { h } from 'vue';
import { createPinia, setActivePinia, type Pinia } from 'pinia';
import { QLayout, QPageContainer, Quasar } from 'quasar';
import {
  DEFAULT_SETTINGS,
  computeLineSet,
  rigBrickTypes,
  type BrickTypeView,
  type LineSetView,
  type PieceView,
  type ScheduleView,
  type VenueView,
} from '@shared/protocol/schedule';
import SchedulePage from '@/pages/SchedulePage.vue';
import LineSetEditDialog from '@/components/schedule/LineSetEditDialog.vue';
import { useAuthStore } from '@/stores/auth';

// Exact definitions: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m (NIST SP 811).
const LB = 0.45359237;
const FT = 0.3048;

/**
 * The server, as far as these screens ask it: each answer queued per "METHOD /path" (the last one
 * repeats), every request kept with its JSON body. The real services/api and services/http run.
 */
type Answer = { status: number; body: unknown };
const answers = new Map<string, Answer[]>();
const sent: Array<{ key: string; body: any }> = [];
const answer = (key: string, status: number, body: unknown) => answers.set(key, [...(answers.get(key) ?? []), { status, body }]);
const sentTo = (key: string) => sent.filter((r) => r.key === key).map((r) => r.body);
async function fakeFetch(url: string, init: RequestInit = {}): Promise<Response> {
  const key = `${init.method ?? 'GET'} ${new URL(url, 'http://localhost').pathname}`;
  sent.push({ key, body: init.body ? JSON.parse(String(init.body)) : undefined });
  const queue = answers.get(key) ?? [];
  const next = queue.length > 1 ? queue.shift()! : queue[0];
  if (!next) return new Response(JSON.stringify({ error: { code: 'not-found', message: `No answer for ${key} in this test.` } }), { status: 404 });
  return new Response(JSON.stringify(next.body), { status: next.status, headers: { 'Content-Type': 'application/json' } });
}
const refusal = (code: string, message: string, fields: Record<string, string[]>) => ({ error: { code, message, fields } });

const venue: VenueView = { id: 1, name: 'Larkspur Playhouse', units: 'imperial', settings: DEFAULT_SETTINGS };
const brickTypes: BrickTypeView[] = [{ id: 1, code: 'full', name: 'Full', massKg: 20 * LB, heightM: null, widthM: null, depthM: null, bridgeCount: 40 }];

/** A 40 ft batten of 1-1/2 in Schedule 40 pipe (2.72 lb/ft) on five lift lines, computed as the server does. */
function lineSet(number: number, name: string, over: Partial<LineSetView> & { pieces?: PieceView[] } = {}): LineSetView {
  const base = {
    number, name, distanceM: number * FT, purchase: 1 as const, pipeSize: '1-1/2 in Schedule 40', pipeKgPerM: 2.72 * LB / FT, pipeLengthM: 40 * FT,
    pipeKg: 2.72 * 40 * LB, liftLinesM: [2, 11, 20, 29, 38].map((f) => f * FT), liftLineRatingKg: 500 * LB, battenRatingKgPerM: 25 * LB / FT,
    arborKg: 90 * LB, arborCapacityKg: 1200 * LB, highTrimM: 30 * FT, lowTrimM: 4 * FT, notes: '', bricks: { full: 1 },
    outOfBalance: false, outOfService: null, openSession: null, version: 3, pieces: [] as PieceView[], ...over,
  };
  return { id: number * 10, ...base, computed: computeLineSet(base, venue, rigBrickTypes(brickTypes)) };
}

const curtain = lineSet(1, 'House curtain', {
  // 108.8 lb of pipe + 11.2 lb of drape = 120 lb; 90 lb arbor + one 20 lb brick = 110 lb: pipe-heavy by 10 lb, within the rope lock.
  pieces: [{ id: 1, name: 'House drape', massKg: 11.2 * LB, positionM: null, spreadFromM: null, spreadToM: null, department: 'Soft goods', notes: '' }],
});
const spare = lineSet(2, 'Spare pipe', { outOfService: 'Lift line chafed at the head block' });
const heavy = lineSet(3, 'Orchestra shell', {
  pieces: [{ id: 2, name: 'Shell ceiling', massKg: 640 * LB, positionM: 11 * FT, spreadFromM: null, spreadToM: null, department: 'Scenery', notes: '' }],
});
const schedule = (): ScheduleView => ({ venue, brickTypes, lineSets: [curtain, spare, heavy] });

let pinia: Pinia;
beforeEach(() => {
  pinia = createPinia();
  setActivePinia(pinia);
  // The technical director: may edit the schedule.
  useAuthStore().me = { id: 1, name: 'Morgan Vale', email: 'td@larkspur.example', venue: { id: 1, name: venue.name, units: 'imperial', timeZone: 'UTC' }, roles: ['admin'], venues: [] };
  answers.clear();
  sent.length = 0;
  vi.stubGlobal('fetch', fakeFetch);
  answer('GET /api/schedule', 200, schedule());
  answer(`GET /api/line-sets/${curtain.id}/photos`, 200, { photos: [] });
});
afterEach(() => {
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function atWidth(width: number) {
  (window as unknown as { happyDOM: { setViewport(v: { width: number; height: number }): void } }).happyDOM.setViewport({ width, height: 740 });
  window.dispatchEvent(new Event('resize'));
}

async function mountPage() {
  const Shell = { render: () => h(QLayout, null, () => h(QPageContainer, null, () => h(SchedulePage))) };
  const wrapper = mount(Shell, { attachTo: document.body, global: { plugins: [Quasar, pinia], stubs: { RouterLink: true } } });
  await flushPromises();
  return wrapper;
}

describe('SchedulePage', () => {
  it('is a list at phone size (360 px): each set with what hangs on it, its balance, and what needs attention', async () => {
    await atWidth(360);
    const wrapper = await mountPage();
    expect(wrapper.find('table').exists()).toBe(false);
    const items = wrapper.findAll('[data-testid^="line-set-item-"]');
    expect(items.map((i) => i.attributes('data-testid'))).toEqual(['line-set-item-1', 'line-set-item-2', 'line-set-item-3']);
    expect(items[0].text()).toContain('1 House curtain');
    expect(items[0].text()).toContain('House drape');
    expect(items[0].text()).toMatch(/pipe-heavy by 10 lb/i);
    // Within the 50 lb rope-lock limit (common practice): no badge, not marked.
    expect(items[0].classes()).not.toContain('rc-alert-row');
    expect(items[1].text()).toContain('Nothing hung');
    expect(items[1].text()).toContain('Out of service');
    expect(items[1].classes()).toContain('rc-alert-row');
    // 640 lb at a lift line rated 500 lb: over capacity, and far out of balance.
    expect(items[2].text()).toContain('Over capacity');
    expect(items[2].text()).toContain('Out of balance');
    wrapper.unmount();
  });

  it('is a table on a laptop (1280 px)', async () => {
    await atWidth(1280);
    const wrapper = await mountPage();
    expect(wrapper.find('table').exists()).toBe(true);
    expect(wrapper.findAll('[data-testid^="line-set-item-"]')).toHaveLength(0);
    expect(wrapper.find('[data-testid="line-set-row-2"]').text()).toContain('Out of service');
    wrapper.unmount();
  });

  it('filters the list by a search for a piece', async () => {
    await atWidth(360);
    const wrapper = await mountPage();
    await wrapper.find('[data-testid="schedule-search"] input, input[data-testid="schedule-search"]').setValue('shell ceiling');
    await flushPromises();
    expect(wrapper.findAll('[data-testid^="line-set-item-"]').map((i) => i.attributes('data-testid'))).toEqual(['line-set-item-3']);
    wrapper.unmount();
  });
});

describe('LineSetEditDialog', () => {
  async function mountDialog(ls: LineSetView | null) {
    await atWidth(360);
    const wrapper = mount(LineSetEditDialog, {
      attachTo: document.body,
      props: { modelValue: false, lineSet: ls, venue, brickTypes, canEditLineSet: true, canEditPieces: true },
      global: { plugins: [Quasar, pinia], stubs: { RouterLink: true } },
    });
    // Opened as the page opens it, so the form is filled from the set.
    await wrapper.setProps({ modelValue: true });
    await flushPromises();
    return wrapper;
  }
  const field = (label: string) => {
    const labelled = [...document.querySelectorAll('label.q-field')].find((l) => l.querySelector('.q-field__label')?.textContent?.trim() === label);
    if (!labelled) throw new Error(`no field "${label}"`);
    return labelled as HTMLElement;
  };
  const input = (label: string) => field(label).querySelector('input, textarea') as HTMLInputElement;
  const type = async (label: string, value: string) => {
    const el = input(label);
    el.value = value;
    el.dispatchEvent(new Event('input'));
    await flushPromises();
  };
  const submit = async () => {
    document.querySelector('form')!.dispatchEvent(new Event('submit', { cancelable: true }));
    await flushPromises();
  };
  const errorOf = (label: string) => field(label).querySelector('.q-field__messages')?.textContent?.trim() ?? '';

  it('shows every field error of an empty new line set under its field, in the shared schema words, and sends nothing', async () => {
    const wrapper = await mountDialog(null);
    await submit();
    expect(errorOf('Number')).toBe('Enter a number');
    expect(errorOf('Batten length (ft)')).not.toBe('');
    expect(errorOf('Lift lines (ft, separated by ;)')).toBe('A batten hangs from at least two lift lines');
    expect(errorOf('Arbor capacity (lb)')).not.toBe('');
    expect(sentTo('POST /api/line-sets')).toEqual([]);
    wrapper.unmount();
  });

  it("puts the server's field errors under the fields they name", async () => {
    const wrapper = await mountDialog(null);
    await type('Number', '1');
    await type('Name or use', 'Second curtain');
    await type('Batten length (ft)', '40');
    await type('Lift lines (ft, separated by ;)', '2; 20; 38');
    await type('Batten rating (lb/ft)', '25');
    await type('Lift line rating (lb)', '500');
    await type('Arbor empty (lb)', '90');
    await type('Arbor capacity (lb)', '1200');
    answer('POST /api/line-sets', 409, refusal('conflict', 'Line set 1 exists already at this venue.', { 'lineSet.number': ['Line set 1 exists already'] }));
    await submit();
    const bodies = sentTo('POST /api/line-sets');
    expect(bodies).toHaveLength(1);
    expect(bodies[0].lineSet).toMatchObject({ number: 1, name: 'Second curtain' });
    expect(bodies[0].lineSet.liftLinesM.map((m: number) => m / FT)).toEqual([2, 20, 38].map((f) => expect.closeTo(f, 12)));
    expect(errorOf('Number')).toBe('Line set 1 exists already');
    expect(errorOf('Name or use')).toBe('');
    wrapper.unmount();
  });

  it('on a 409 conflict says who changed it, keeps what was typed, and saves over the version now stored', async () => {
    const wrapper = await mountDialog(curtain);
    await type('Name or use', 'House curtain (new velour)');
    await type('Notes', 'Re-weighed after the re-hang');
    const message = 'Line set 1 was changed by Jo Castellan at 14:02 UTC after you opened it. Nothing was saved; what you typed is still in the form. Look at their change, then save again.';
    const save = `PUT /api/line-sets/${curtain.id}`;
    answer(save, 409, refusal('conflict', message, { version: ['Now at version 4'] }));
    answer(save, 200, { lineSet: { ...curtain, name: 'House curtain (new velour)', notes: 'Re-weighed after the re-hang', version: 5 } });
    answers.set('GET /api/schedule', [{ status: 200, body: { ...schedule(), lineSets: [{ ...curtain, version: 4, notes: 'Jo: bricks checked' }, spare, heavy] } }]);
    await submit();
    expect(document.querySelector('[data-testid="edit-conflict"]')?.textContent).toContain('changed by Jo Castellan');
    expect(input('Name or use').value).toBe('House curtain (new velour)');
    expect(input('Notes').value).toBe('Re-weighed after the re-hang');
    expect(sentTo(save)[0].version).toBe(3);

    // The second save goes over their change knowingly: the version they saved, with what was typed.
    await submit();
    const saves = sentTo(save);
    expect(saves).toHaveLength(2);
    expect(saves[1].version).toBe(4);
    expect(saves[1].lineSet).toMatchObject({ name: 'House curtain (new velour)', notes: 'Re-weighed after the re-hang' });
    expect(document.querySelector('[data-testid="edit-conflict"]')).toBeNull();
    wrapper.unmount();
  });
});
