/**
 * Speaks a call through the browser's own speech synthesis (no sound files, nothing downloaded).
 * A hold interrupts whatever is being said; anything else waits its turn.
 */
export function canSpeak(): boolean {
  return typeof window !== 'undefined' && 'speechSynthesis' in window && typeof SpeechSynthesisUtterance !== 'undefined';
}

export function speak(text: string, { volume, urgent = false }: { volume: number; urgent?: boolean }): boolean {
  if (!canSpeak()) return false;
  try {
    const utterance = new SpeechSynthesisUtterance(text);
    utterance.volume = Math.min(1, Math.max(0, volume));
    utterance.rate = 1.05;
    utterance.lang = 'en';
    if (urgent) window.speechSynthesis.cancel();
    window.speechSynthesis.speak(utterance);
    return true;
  } catch {
    return false;
  }
}
