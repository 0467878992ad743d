import { describe, expect, it } from 'vitest';
import { defineComponent, h, ref } from 'vue';
import { mount } from '@vue/test-utils';
import { Quasar } from 'quasar';
import DecimalInput from '@/components/DecimalInput.vue';

/** A form holding one number, as the schedule and venue forms do. */
function form(start: number | null = null) {
  const value = ref<number | null>(start);
  const wrapper = mount(defineComponent({
    setup: () => () => h(DecimalInput, { modelValue: value.value, 'onUpdate:modelValue': (v: number | null) => (value.value = v), label: 'Weight (kg)' }),
  }), { global: { plugins: [Quasar] } });
  return { wrapper, value };
}

describe('DecimalInput', () => {
  it('gives the form 40.5 for "40,5" and for "40.5"', async () => {
    const { wrapper, value } = form();
    await wrapper.get('input').setValue('40,5');
    expect(value.value).toBe(40.5);
    expect(wrapper.get('input').element.value).toBe('40,5');
    await wrapper.get('input').setValue('40.5');
    expect(value.value).toBe(40.5);
  });

  it('gives null for an empty field and NaN, with the reason shown, for text that is not a number', async () => {
    const { wrapper, value } = form(12);
    expect(wrapper.get('input').element.value).toBe('12');
    await wrapper.get('input').setValue('');
    expect(value.value).toBeNull();
    await wrapper.get('input').setValue('1,500');
    expect(value.value).toBeNaN();
    expect(wrapper.text()).toContain('could be 1500 or 1.5');
  });

  it('shows a value the form sets from outside', async () => {
    const { wrapper, value } = form(3);
    value.value = 7.25;
    await wrapper.vm.$nextTick();
    expect(wrapper.get('input').element.value).toBe('7.25');
  });
});
