import { watch, type Ref } from 'vue';
import type { SessionRole } from '@shared/protocol/roles';
import { speak } from '@/services/speech';
import { useVoiceStore } from '@/stores/voice';
import { spokenReAlert, spokenWords, type SpeakableEntry } from '@/utils/spokenCalls';

/**
 * Speaks each new log entry's call, if spoken calls are on for this phone. Only entries that arrive
 * while the screen is open are spoken: the backlog caught up on opening stays quiet.
 * `prefix` marks every spoken sentence of a practice ("Practice.").
 */
export function useSpokenCalls(options: {
  entries: Ref<readonly (SpeakableEntry & { seq: number })[]>;
  role: Ref<SessionRole | null>;
  /** Changes when Railcall re-alerts this person, with the line set called. */
  reAlert?: Ref<{ atMs: number; lineSetName: unknown } | null>;
  prefix?: string;
}): void {
  const voice = useVoiceStore();
  let spokenUpTo: number | null = null;
  const say = (text: string, urgent: boolean) => {
    if (voice.enabled) speak(`${options.prefix ?? ''}${text}`, { volume: voice.volume, urgent });
  };

  watch(
    options.entries,
    (entries) => {
      const top = entries.reduce((max, e) => Math.max(max, e.seq), 0);
      if (spokenUpTo === null || top < spokenUpTo) {
        // First look (or a new session): start from here.
        spokenUpTo = top;
        return;
      }
      for (const entry of entries) {
        if (entry.seq <= spokenUpTo) continue;
        const words = spokenWords(entry, options.role.value);
        if (words) say(words, entry.kind === 'hold-called');
      }
      spokenUpTo = top;
    },
    { immediate: true },
  );

  if (options.reAlert) {
    watch(options.reAlert, (alert) => {
      if (alert) say(spokenReAlert(alert.lineSetName), false);
    });
  }
}
