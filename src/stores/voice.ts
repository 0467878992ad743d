import { defineStore } from 'pinia';
import { ref, watch } from 'vue';

const STORAGE_KEY = 'railcall.voice';

interface VoiceSettings {
  enabled: boolean;
  volume: number;
}

function loadSettings(): VoiceSettings {
  try {
    const saved = JSON.parse(globalThis.localStorage?.getItem(STORAGE_KEY) ?? 'null') as Partial<VoiceSettings> | null;
    return {
      enabled: saved?.enabled === true,
      volume: typeof saved?.volume === 'number' && saved.volume >= 0 && saved.volume <= 1 ? saved.volume : 1,
    };
  } catch {
    return { enabled: false, volume: 1 };
  }
}

/** Spoken calls on this phone: on or off, and how loud. Kept on the phone, not the account. */
export const useVoiceStore = defineStore('voice', () => {
  const initial = loadSettings();
  const enabled = ref(initial.enabled);
  const volume = ref(initial.volume);
  watch([enabled, volume], () => {
    try {
      globalThis.localStorage?.setItem(STORAGE_KEY, JSON.stringify({ enabled: enabled.value, volume: volume.value }));
    } catch {
      // A phone that will not store it forgets it at reload: nothing else depends on it.
    }
  });
  return { enabled, volume };
});
