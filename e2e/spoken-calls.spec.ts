import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

test.use({ baseURL: laneUrl('spoken-calls') });
const base = laneUrl('spoken-calls');

/** Watches the browser's own speechSynthesis: every utterance passed to speak() is kept, and still spoken. */
const OBSERVE_SPEECH = () => {
  const said: string[] = [];
  (window as unknown as { __said: string[] }).__said = said;
  const synth = window.speechSynthesis;
  const speak = synth.speak.bind(synth);
  synth.speak = (utterance: SpeechSynthesisUtterance) => {
    said.push(utterance.text);
    speak(utterance);
  };
};

test('a phone with spoken calls on says the call, the hold and loading complete in words', async ({ browser }) => {
  test.setTimeout(120_000);
  const rail = await openPhone(browser, base, 'rail');
  const deck = await openPhone(browser, base, 'deck');
  await deck.context.addInitScript(OBSERVE_SPEECH);
  const schedule = await (await rail.page.request.get('/api/schedule')).json();
  const set7 = schedule.lineSets.find((l: { number: number }) => l.number === 7);
  const opened = await rail.page.request.post('/api/sessions', {
    data: { title: 'Spoken calls', lineSets: [{ lineSetId: set7.id, remove: set7.pieces.map((p: { id: number }) => p.id), add: [] }] },
  });
  const sessionId: number = (await opened.json()).session.id;
  const act = (who: typeof rail, action: Record<string, unknown>) =>
    who.page.request.post(`/api/sessions/${sessionId}/actions`, { data: { key: `say-${Math.random().toString(36).slice(2, 12)}`, clientTimeMs: Date.now(), action } });
  const loader1 = await openPhone(browser, base, 'loader1');
  const loader2 = await openPhone(browser, base, 'loader2');
  await act(loader1, { type: 'join', role: 'loader' });
  await act(loader2, { type: 'join', role: 'loader' });
  await act(deck, { type: 'join', role: 'deck' });
  await act(rail, { type: 'begin' });

  const { page } = deck;
  await page.goto(`/sessions/${sessionId}`);
  await page.getByTestId('voice-settings').click();
  await page.getByTestId('voice-toggle').click();
  await page.keyboard.press('Escape');
  const said = () => page.evaluate(() => (window as unknown as { __said: string[] }).__said);

  expect((await act(rail, { type: 'call-move' })).status()).toBe(200);
  await expect.poll(said).toContain('Line set 7 coming in');
  expect((await act(loader1, { type: 'call-hold', reason: 'Someone under the gallery' })).status()).toBe(200);
  await expect.poll(said).toContain('Hold, hold, hold. Someone under the gallery');

  // Release the hold and work the set through to "loading complete" from the other phones.
  for (const who of [rail, loader2, deck]) await act(who, { type: 'ack-hold' });
  expect((await act(rail, { type: 'release-hold' })).status()).toBe(200);
  await expect.poll(said).toContain('Hold released');
  for (const who of [loader1, loader2, deck]) await act(who, { type: 'answer-clear' });
  const { state } = await (await rail.page.request.get(`/api/sessions/${sessionId}`)).json();
  const ls = state.lineSets[0];
  expect((await act(rail, { type: 'confirm-locked' })).status()).toBe(200);
  if (ls.needsTieOff) await act(rail, { type: 'confirm-tie-off' });
  await act(loader1, { type: 'call-clear-rail' });
  expect((await act(rail, { type: 'confirm-rail-clear' })).status()).toBe(200);
  for (const [stepIndex, step] of (ls.steps as Array<{ kind: string }>).entries()) {
    if (step.kind.endsWith('bricks')) expect((await act(loader1, { type: 'confirm-step', stepIndex })).status()).toBe(200);
    if (step.kind.endsWith('piece')) expect((await act(deck, { type: 'confirm-step', stepIndex })).status()).toBe(200);
  }
  expect((await act(loader1, { type: 'call-loading-complete' })).status()).toBe(200);
  await expect.poll(said).toContain('Loading complete');
  expect(await said()).toEqual(expect.arrayContaining(['Line set 7 in and locked', 'Clear the rail', 'Rail is clear. Loaders, go ahead']));

  // A phone with spoken calls off says nothing.
  const loaderSaid = await loader2.page.evaluate(() => (window as unknown as { __said?: string[] }).__said ?? []);
  expect(loaderSaid).toEqual([]);
});
