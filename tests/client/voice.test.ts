import { beforeEach, describe, expect, it } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { nextTick } from 'vue';
import { useVoiceStore } from '@/stores/voice';

describe('the voice store', () => {
  beforeEach(() => {
    localStorage.clear();
    setActivePinia(createPinia());
  });

  it('starts silent at full volume on a new phone', () => {
    const voice = useVoiceStore();
    expect(voice.enabled).toBe(false);
    expect(voice.volume).toBe(1);
  });

  it('keeps the switch and the volume on the phone across a reload', async () => {
    const voice = useVoiceStore();
    voice.enabled = true;
    voice.volume = 0.4;
    await nextTick();
    setActivePinia(createPinia());
    const again = useVoiceStore();
    expect(again.enabled).toBe(true);
    expect(again.volume).toBe(0.4);
  });

  it('ignores a stored volume out of range', () => {
    localStorage.setItem('railcall.voice', JSON.stringify({ enabled: true, volume: 7 }));
    expect(useVoiceStore().volume).toBe(1);
  });
});
