import { describe, expect, it } from 'vitest';
import { flushPromises, mount } from '@vue/test-utils';
import { h } from 'vue';
import { createPinia } from 'pinia';
import { createMemoryHistory, createRouter } from 'vue-router';
import { QLayout, QPageContainer, Quasar } from 'quasar';
import SignInPage from '@/pages/SignInPage.vue';

async function mountSignIn() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [{ path: '/sign-in', component: SignInPage }],
  });
  await router.push('/sign-in?next=/rail');
  await router.isReady();
  // QPage only renders inside a QLayout's page container, as in the app.
  const Shell = { render: () => h(QLayout, null, () => h(QPageContainer, null, () => h(SignInPage))) };
  return mount(Shell, { attachTo: document.body, global: { plugins: [Quasar, createPinia(), router] } });
}

describe('SignInPage', () => {
  it('shows a heading, an e-mail field, a password field and a sign-in button', async () => {
    const wrapper = await mountSignIn();
    expect(wrapper.find('h1').text()).toBe('Sign in');
    const email = wrapper.find('input[type="email"]');
    expect(email.exists()).toBe(true);
    expect(email.attributes('autocomplete')).toBe('username');
    expect(wrapper.find('input[type="password"]').attributes('autocomplete')).toBe('current-password');
    expect(wrapper.text()).toContain('E-mail');
    expect(wrapper.text()).toContain('Password');
    expect(wrapper.find('button[type="submit"]').text()).toContain('Sign in');
    wrapper.unmount();
  });

  it('says what is missing before sending anything, in the words of the shared schema', async () => {
    const wrapper = await mountSignIn();
    await wrapper.find('form').trigger('submit');
    await flushPromises();
    expect(wrapper.text()).toContain('Enter an e-mail address');
    expect(wrapper.text()).toContain('Enter your password');
    expect(wrapper.find('[data-testid="sign-in-problem"]').exists()).toBe(false);
    wrapper.unmount();
  });

  it('lets the person show the password they typed', async () => {
    const wrapper = await mountSignIn();
    const show = wrapper.find('button[aria-label="Show password"]');
    expect(show.exists()).toBe(true);
    await show.trigger('click');
    expect(wrapper.find('input[autocomplete="current-password"]').attributes('type')).toBe('text');
    expect(wrapper.find('button[aria-label="Hide password"]').exists()).toBe(true);
    wrapper.unmount();
  });
});
