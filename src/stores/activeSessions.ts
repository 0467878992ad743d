import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { SessionSummary } from '@shared/protocol/sessions-api';
import * as api from '@/services/api';
import { socket } from '@/services/socket';

/**
 * The venue's running loading sessions, as the home screens list them. The server says
 * `venue:sessions-changed` to everyone signed in at the venue when a session opens, begins, finishes
 * or ends; the list is asked again at once then, and on every reconnect (anything may have changed
 * while the socket was away). The home screen polls only as a fallback.
 */
export const useActiveSessionsStore = defineStore('activeSessions', () => {
  const sessions = ref<SessionSummary[]>([]);
  const loading = ref(false);
  const loaded = ref(false);
  /** How many home lists are on screen: the socket's news is fetched only while one is. */
  const shown = ref(0);

  async function load(): Promise<void> {
    loading.value = true;
    try {
      sessions.value = await api.listActiveSessions();
      loaded.value = true;
    } finally {
      loading.value = false;
    }
  }

  // Bound once, here: quietly, a failed look-up is tried again on the next change or the fallback poll.
  const refreshShown = () => {
    if (shown.value > 0) void load().catch(() => undefined);
  };
  socket.on('venue:sessions-changed', refreshShown);
  socket.on('connect', refreshShown);

  return { sessions, loading, loaded, shown, load };
});
