import { mount } from '@vue/test-utils'
import { describe, expect, it, vi } from 'vitest'
import SignInForgotForm from '@/components/SignInForgotForm.vue'
import { flush } from './helpers'

describe('SignInForgotForm', () => {
  it('posts the address and shows the server’s neutral reply in place of the form', async () => {
    const requestReset = vi.fn(async () => ({ message: 'If that address belongs to an account, a reset link is on its way.' }))
    const wrapper = mount(SignInForgotForm, { props: { requestReset, initialEmail: 'observer@kestrel-ridge.example' } })
    await wrapper.get('form').trigger('submit')
    await flush()
    expect(requestReset).toHaveBeenCalledWith('observer@kestrel-ridge.example')
    expect(wrapper.get('[data-testid="forgot-reply"]').text()).toBe('If that address belongs to an account, a reset link is on its way.')
    expect(wrapper.find('[data-testid="forgot-email"]').exists()).toBe(false)
  })
})
