import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { connectSocket, disconnectSocket, socket } from '@/services/socket';

/**
 * Whether the live connection to the server is up.
 * The socket's own events feed this store; components only read it.
 */
export const useConnectionStore = defineStore('connection', () => {
  /** True between sign-in and sign-out: the app wants a live connection. */
  const wanted = ref(false);
  const connected = ref(socket.connected);
  /** Set after the first successful connect, so the first handshake is not shown as a drop. */
  const hasConnected = ref(false);
  const lastFailure = ref<string | null>(null);

  socket.on('connect', () => {
    connected.value = true;
    hasConnected.value = true;
    lastFailure.value = null;
  });
  socket.on('disconnect', () => {
    connected.value = false;
  });
  socket.on('connect_error', (error) => {
    connected.value = false;
    lastFailure.value = error.message;
  });

  /** The banner condition: signed in, and the connection dropped or could not be made. */
  const dropped = computed(() => wanted.value && !connected.value && (hasConnected.value || lastFailure.value !== null));
  /** The client keeps retrying by itself unless the server closed the door. */
  const retrying = computed(() => dropped.value && socket.active);

  function start(): void {
    wanted.value = true;
    connectSocket();
  }

  function stop(): void {
    wanted.value = false;
    hasConnected.value = false;
    lastFailure.value = null;
    disconnectSocket();
  }

  /** Try again now (after the server refused, or from the banner). */
  function retry(): void {
    if (!wanted.value) return;
    disconnectSocket();
    connectSocket();
  }

  return { wanted, connected, hasConnected, lastFailure, dropped, retrying, start, stop, retry };
});
