import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { Me, NewVenueInput, SignInInput } from '@shared/protocol/people';
import type { Role } from '@shared/protocol/roles';
import * as api from '@/services/api';
import { ApiFailure } from '@/services/http';
import { forgetEverything, loadMe, saveMe } from '@/services/offlineCache';
import { socket } from '@/services/socket';
import { homeFor, orderedRoles, roleHomesFor, SIGN_IN_PATH } from '@/router/access';
import { useConnectionStore } from './connection';

/** Who is signed in, and the sign-in and sign-out steps. */
export const useAuthStore = defineStore('auth', () => {
  const me = ref<Me | null>(null);
  /** True when `me` comes from this phone's own copy because the server could not be reached. */
  const fromCache = ref(false);
  /** True once the first `/api/me` answer (or failure) is in. */
  const loaded = ref(false);
  const connection = useConnectionStore();

  const signedIn = computed(() => me.value !== null);
  /** Why this phone was signed out by the server (roles taken away), for the sign-in page to say once. */
  const signedOutReason = ref<string | null>(null);
  /** The venue's IANA time zone, for every date and time on screen (undefined: the phone's own, until known). */
  const timeZone = computed<string | undefined>(() => me.value?.venue.timeZone);
  const roles = computed<Role[]>(() => orderedRoles(me.value?.roles ?? []));
  /** Path of this person's home screen. */
  const homeRoute = computed(() => homeFor(roles.value));
  /** Every role home this person can switch to, in role order. */
  const roleHomes = computed(() => roleHomesFor(roles.value));

  function hasRole(role: Role): boolean {
    return roles.value.includes(role);
  }

  function become(person: Me | null): void {
    me.value = person;
    fromCache.value = false;
    if (person) void saveMe(person);
    if (person) connection.start();
    else connection.stop();
  }

  /** Asks the server who is signed in (on start, and when the live connection is refused). */
  async function load(): Promise<Me | null> {
    try {
      become(await api.getMeOrNull());
    } catch (error) {
      // No signal: open as the person last signed in on this phone; the server checks again on reconnect.
      const cached = error instanceof ApiFailure && error.code === 'network' ? await loadMe() : null;
      if (!cached) throw error;
      me.value = cached;
      fromCache.value = true;
      connection.start();
    } finally {
      loaded.value = true;
    }
    return me.value;
  }

  /** Rejects with an ApiFailure whose message is written for the person. */
  async function signIn(input: SignInInput): Promise<Me> {
    const person = await api.signIn(input);
    become(person);
    return person;
  }

  /** Sets the password from an invitation; the server signs the person in. */
  async function acceptInvite(token: string, password: string): Promise<Me> {
    const person = await api.acceptInvite(token, password);
    become(person);
    return person;
  }

  /** Opens another venue, directed by this person, and switches to it. */
  async function openVenue(input: NewVenueInput): Promise<Me> {
    const person = await api.openVenue(input);
    become(person);
    return person;
  }

  /** Switches the venue this sign-in acts on (every tab of it follows). */
  async function chooseVenue(venueId: number): Promise<Me> {
    const person = await api.chooseVenue(venueId);
    become(person);
    return person;
  }

  /** Sets a new password from a reset link; signs in as that person. */
  async function resetPassword(token: string, password: string): Promise<Me> {
    const person = await api.resetPassword(token, password);
    become(person);
    return person;
  }

  async function signOut(): Promise<void> {
    try {
      await api.signOut();
    } finally {
      // Even if the server is unreachable, this device forgets the person.
      become(null);
      await forgetEverything();
    }
  }

  // Signed out elsewhere (another tab, or an admin): the server says so before it disconnects.
  socket.on('auth:signed-out', () => {
    become(null);
    void forgetEverything();
  });
  // Shown again from the browser's back-forward cache (Back after leaving the page): the page's state
  // is as it was, maybe another person's. Ask who is signed in now; anyone else starts from a fresh page.
  window.addEventListener('pageshow', (event) => {
    if (!event.persisted) return;
    const shownFor = me.value?.id ?? null;
    void api.getMeOrNull().then((now) => {
      if ((now?.id ?? null) === shownFor) return;
      become(null);
      window.location.replace(now ? '/' : SIGN_IN_PATH);
    }, () => undefined);
  });
  // Another tab of this sign-in switched venue: show the venue it chose here too.
  socket.on('me:venue-changed', () => void load().catch(() => undefined));
  // The technical director changed this person's roles: ask who we are now; none left means signed out.
  socket.on('me:roles-changed', ({ reason }) => {
    void load().then((now) => {
      if (!now) {
        signedOutReason.value = reason;
        void forgetEverything();
      }
    }, () => undefined);
  });
  // The server refused the live connection (e.g. the session expired): check who we still are.
  // Back online after opening from the cache: ask who we are for real.
  socket.on('connect', () => {
    if (fromCache.value) void load().catch(() => undefined);
  });
  socket.on('connect_error', () => {
    if (!socket.active && me.value) void load().catch(() => undefined);
  });

  return { me, fromCache, loaded, signedIn, signedOutReason, timeZone, roles, homeRoute, roleHomes, hasRole, load, become, signIn, acceptInvite, chooseVenue, openVenue, resetPassword, signOut };
});
