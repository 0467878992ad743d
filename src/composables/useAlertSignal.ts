/**
 * The attention signal for a call or a hold: a vibration (where the phone has one) and a tone made
 * with Web Audio, so there is no sound file to download. Each kind has its own vibration pattern, so
 * a phone in a pocket says which it is: a call is two pulses, a re-alert four, a hold three long.
 */
export type AlertKind = 'call' | 're-alert' | 'hold' | 'hold-released';

export const VIBRATION_PATTERNS: Record<AlertKind, number[]> = {
  call: [250, 100, 250],
  're-alert': [250, 100, 250, 100, 250, 100, 250],
  hold: [700, 200, 700, 200, 700],
  'hold-released': [120, 80, 120],
};

/** Two rising tones for a call; for a hold, three low blasts that cannot be mistaken for a call. */
const TONES: Record<AlertKind, Array<{ hz: number; startS: number; lengthS: number }>> = {
  call: [{ hz: 880, startS: 0, lengthS: 0.16 }, { hz: 660, startS: 0.18, lengthS: 0.16 }],
  're-alert': [{ hz: 880, startS: 0, lengthS: 0.12 }, { hz: 660, startS: 0.15, lengthS: 0.12 }, { hz: 880, startS: 0.3, lengthS: 0.12 }, { hz: 660, startS: 0.45, lengthS: 0.12 }],
  hold: [{ hz: 392, startS: 0, lengthS: 0.35 }, { hz: 392, startS: 0.5, lengthS: 0.35 }, { hz: 392, startS: 1, lengthS: 0.35 }],
  'hold-released': [{ hz: 660, startS: 0, lengthS: 0.1 }, { hz: 880, startS: 0.14, lengthS: 0.12 }],
};
let audio: AudioContext | null = null;

function beep(kind: AlertKind): void {
  const Ctx = globalThis.AudioContext ?? (globalThis as unknown as { webkitAudioContext?: typeof AudioContext }).webkitAudioContext;
  if (!Ctx) return;
  try {
    audio ??= new Ctx();
    void audio.resume?.();
    const now = audio.currentTime;
    for (const tone of TONES[kind]) {
      const osc = audio.createOscillator();
      const gain = audio.createGain();
      osc.type = kind === 'hold' ? 'square' : 'sine';
      osc.frequency.value = tone.hz;
      gain.gain.setValueAtTime(0.25, now + tone.startS);
      gain.gain.exponentialRampToValueAtTime(0.001, now + tone.startS + tone.lengthS);
      osc.connect(gain).connect(audio.destination);
      osc.start(now + tone.startS);
      osc.stop(now + tone.startS + tone.lengthS + 0.01);
    }
  } catch {
    // No sound allowed before the first tap on some phones: the vibration and the screen still say it.
  }
}

export function signalAttention(kind: AlertKind): void {
  if (typeof navigator !== 'undefined' && typeof navigator.vibrate === 'function') navigator.vibrate(VIBRATION_PATTERNS[kind]);
  beep(kind);
}
