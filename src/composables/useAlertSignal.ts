/**
 * The attention signal for a call or a hold: a vibration (where the phone has one) and a short
 * two-tone beep made with Web Audio, so there is no sound file to download.
 */
let audio: AudioContext | null = null;

function beep(): void {
  const Ctx = globalThis.AudioContext ?? (globalThis as unknown as { webkitAudioContext?: typeof AudioContext }).webkitAudioContext;
  if (!Ctx) return;
  try {
    audio ??= new Ctx();
    void audio.resume?.();
    const now = audio.currentTime;
    for (const [i, hz] of [880, 660].entries()) {
      const osc = audio.createOscillator();
      const gain = audio.createGain();
      osc.frequency.value = hz;
      gain.gain.setValueAtTime(0.25, now + i * 0.18);
      gain.gain.exponentialRampToValueAtTime(0.001, now + i * 0.18 + 0.16);
      osc.connect(gain).connect(audio.destination);
      osc.start(now + i * 0.18);
      osc.stop(now + i * 0.18 + 0.17);
    }
  } catch {
    // No sound allowed before the first tap on some phones: the vibration and the screen still say it.
  }
}

export function signalAttention(kind: 'call' | 'hold'): void {
  if (typeof navigator !== 'undefined' && typeof navigator.vibrate === 'function') {
    navigator.vibrate(kind === 'hold' ? [400, 150, 400, 150, 400] : [250, 100, 250]);
  }
  beep();
}
