import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { SessionSummary } from '@shared/protocol/sessions-api';
import * as api from '@/services/api';

/** The venue's running loading sessions, as the role home screens list them. */
export const useActiveSessionsStore = defineStore('activeSessions', () => {
  const sessions = ref<SessionSummary[]>([]);
  const loading = ref(false);
  const loaded = ref(false);

  async function load(): Promise<void> {
    loading.value = true;
    try {
      sessions.value = await api.listActiveSessions();
      loaded.value = true;
    } finally {
      loading.value = false;
    }
  }

  return { sessions, loading, loaded, load };
});
