import { describe, expect, it } from 'vitest';
import { mount } from '@vue/test-utils';
import { Quasar } from 'quasar';
import BalancePicture from '@/components/session/BalancePicture.vue';
import { LB, ROPE_LOCK_KG, brickTypes, twoDrapeLoad } from './support/session';

function picture(load = twoDrapeLoad, units: 'imperial' | 'metric' = 'imperial', ropeLockLimitKg = ROPE_LOCK_KG) {
  return mount(BalancePicture, {
    props: { load, brickTypes, ropeLockLimitKg, units, pieceNames: { a: 'Sea-mist drape A', b: 'Sea-mist drape B' } },
    global: { plugins: [Quasar] },
  });
}

describe('BalancePicture', () => {
  it('draws a balanced set level, says "Balanced" and shows both sides equal', () => {
    const wrapper = picture();
    const figure = wrapper.get('[data-testid="balance-picture"]');
    expect(figure.attributes('data-heavy')).toBe('balanced');
    expect(wrapper.get('[data-testid="balance-words"]').text()).toBe('Balanced');
    expect(wrapper.find('[data-testid="balanced-marker"]').exists()).toBe(true);
    expect(wrapper.find('[data-testid="heavy-marker"]').exists()).toBe(false);
    // 60 lb pipe + 2 x 40 lb drapes; 60 lb arbor + 4 x 20 lb bricks.
    expect(wrapper.get('[data-testid="batten-kg"]').text()).toBe('140 lb');
    expect(wrapper.get('[data-testid="arbor-kg"]').text()).toBe('140 lb');
    const beam = wrapper.get('[data-testid="beam"]');
    expect(beam.attributes('y1')).toBe(beam.attributes('y2'));
  });

  it('after two bricks are pulled, tips to the pipe side and says so in shape and words', () => {
    const wrapper = picture({ ...twoDrapeLoad, bricks: { full: 2 } });
    expect(wrapper.get('[data-testid="balance-picture"]').attributes('data-heavy')).toBe('pipe');
    expect(wrapper.get('[data-testid="balance-words"]').text()).toBe('Pipe-heavy by 40 lb');
    // The heavy marker is drawn under the batten end (left half) with the word HEAVY.
    const marker = wrapper.get('[data-testid="heavy-marker"]');
    expect(marker.text()).toContain('HEAVY');
    expect(Number(marker.get('text').attributes('x'))).toBeLessThan(160);
    // The batten end of the beam is lower (larger y) than the arbor end.
    const beam = wrapper.get('[data-testid="beam"]');
    expect(Number(beam.attributes('y1'))).toBeGreaterThan(Number(beam.attributes('y2')));
    expect(wrapper.get('[data-testid="brick-count"]').text()).toBe('2');
    expect(wrapper.findAll('[data-testid="brick"]')).toHaveLength(2);
    expect(wrapper.findAll('[data-testid="piece"]')).toHaveLength(2);
    // The picture numbers the pieces; their names are listed in full beside it, never cut.
    expect(wrapper.findAll('[data-testid="piece-names"] li').map((li) => li.text())).toEqual(['Sea-mist drape A', 'Sea-mist drape B']);
    expect(wrapper.get('svg title').text()).toContain('Pipe-heavy by 40 lb');
  });

  it('marks an arbor-heavy set on the arbor side', () => {
    const wrapper = picture({ ...twoDrapeLoad, pieces: [twoDrapeLoad.pieces[0]] }, 'metric');
    expect(wrapper.get('[data-testid="balance-picture"]').attributes('data-heavy')).toBe('arbor');
    expect(wrapper.get('[data-testid="balance-words"]').text()).toBe(`Arbor-heavy by ${(40 * LB).toFixed(1)} kg`);
    expect(Number(wrapper.get('[data-testid="heavy-marker"] text').attributes('x'))).toBeGreaterThan(160);
  });

  it('draws the rope lock limit as a band around balance and says when the set is within it', () => {
    const wrapper = picture({ ...twoDrapeLoad, bricks: { full: 2 } });
    const band = wrapper.get('[data-testid="limit-band"]');
    const left = Number(band.attributes('x'));
    const right = left + Number(band.attributes('width'));
    // The band is centred on balance (x = 160).
    expect((left + right) / 2).toBeCloseTo(160, 5);
    expect(wrapper.get('[data-testid="balance-picture"]').attributes('data-within-limit')).toBe('true');
    expect(wrapper.get('[data-testid="limit-words"]').text()).toBe('50 lb: within');
    // Inside the band, the marker is a plain triangle.
    expect(wrapper.get('[data-testid="gauge-marker"]').element.tagName.toLowerCase()).toBe('polygon');
  });

  it('beyond the limit, the marker becomes a warning diamond with "!" and the words say to tie off', () => {
    // Four bricks pulled: 80 lb pipe-heavy against a 50 lb rope lock.
    const wrapper = picture({ ...twoDrapeLoad, bricks: {} });
    expect(wrapper.get('[data-testid="balance-picture"]').attributes('data-within-limit')).toBe('false');
    expect(wrapper.get('[data-testid="balance-words"]').text()).toBe('Pipe-heavy by 80 lb');
    expect(wrapper.get('[data-testid="limit-words"]').text()).toContain('BEYOND');
    const marker = wrapper.get('[data-testid="gauge-marker"]');
    expect(marker.element.tagName.toLowerCase()).toBe('g');
    expect(marker.text()).toBe('!');
    const band = wrapper.get('[data-testid="limit-band"]');
    const markerX = Number(marker.get('text').attributes('x'));
    expect(markerX).toBeLessThan(Number(band.attributes('x')));
  });

  it('judges a double-purchase set at the batten (arbor side halved)', () => {
    const wrapper = picture({ purchase: 2, pipeKg: 100 * LB, arborKg: 120 * LB, pieces: [], bricks: { full: 4 } });
    expect(wrapper.get('[data-testid="arbor-kg"]').text()).toBe('100 lb');
    expect(wrapper.get('[data-testid="balance-words"]').text()).toBe('Balanced');
  });
});
