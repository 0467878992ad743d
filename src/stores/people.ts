import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { AddPersonInput, AddPersonResult, EditPersonInput, PersonRow } from '@shared/protocol/people';
import type { Role } from '@shared/protocol/roles';
import * as api from '@/services/api';

function byName(a: PersonRow, b: PersonRow): number {
  return a.name.localeCompare(b.name);
}

/** The venue's people, as the technical director manages them. */
export const usePeopleStore = defineStore('people', () => {
  const people = ref<PersonRow[]>([]);
  const loading = ref(false);
  const loaded = ref(false);

  function upsert(person: PersonRow): void {
    const others = people.value.filter((row) => row.id !== person.id);
    people.value = [...others, person].sort(byName);
  }

  async function load(): Promise<void> {
    loading.value = true;
    try {
      const answer = await api.listPeople();
      people.value = [...answer.people].sort(byName);
      loaded.value = true;
    } finally {
      loading.value = false;
    }
  }

  /**
   * Adds a person and answers with their one-time invitation link.
   * The link is handed back, never kept here: it is shown once and then forgotten.
   */
  async function add(input: AddPersonInput): Promise<AddPersonResult> {
    const result = await api.addPerson(input);
    upsert(result.person);
    return result;
  }

  /** Rejects with a conflict ApiFailure when it would remove the last technical director. */
  async function setRoles(id: number, roles: Role[]): Promise<PersonRow> {
    const { person } = await api.setPersonRoles(id, roles);
    upsert(person);
    return person;
  }

  async function edit(id: number, input: EditPersonInput): Promise<PersonRow> {
    const { person } = await api.editPerson(id, input);
    upsert(person);
    return person;
  }

  /** A new invitation link (the old one stops working), mailed; handed back to show once. */
  async function resendInvitation(id: number): Promise<AddPersonResult> {
    const result = await api.resendInvitation(id);
    upsert(result.person);
    return result;
  }

  async function revokeInvitation(id: number): Promise<PersonRow> {
    const { person } = await api.revokeInvitation(id);
    upsert(person);
    return person;
  }

  /** Signs the person out on every device at once; they stay listed, their log entries kept. */
  async function deactivate(id: number): Promise<PersonRow> {
    const { person } = await api.deactivatePerson(id);
    upsert(person);
    return person;
  }

  async function reactivate(id: number): Promise<PersonRow> {
    const { person } = await api.reactivatePerson(id);
    upsert(person);
    return person;
  }

  return { people, loading, loaded, load, add, setRoles, edit, resendInvitation, revokeInvitation, deactivate, reactivate };
});
