import { mount } from '@vue/test-utils'
import { describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import type { PublicUser } from '@/api/types'
import SignInForm from '@/components/SignInForm.vue'
import { flush } from './helpers'

const lead: PublicUser = {
  id: 1,
  email: 'lead@kestrel-ridge.example',
  name: 'Maren Olukoya',
  role: 'lead',
  active: true,
  invited: false,
  lastLoginAt: null,
  createdAt: '2026-01-05T10:00:00.000Z',
}

async function fillAndSubmit(signIn: (email: string, password: string) => Promise<PublicUser>) {
  const wrapper = mount(SignInForm, { props: { signIn } })
  await wrapper.get('[data-testid="signin-email"]').setValue(' lead@kestrel-ridge.example ')
  await wrapper.get('[data-testid="signin-password"]').setValue('lead-demo-2026')
  await wrapper.get('form').trigger('submit')
  await flush()
  return wrapper
}

describe('SignInForm', () => {
  it('sends the trimmed e-mail and the password, and reports the signed-in user', async () => {
    const signIn = vi.fn(async () => lead)
    const wrapper = await fillAndSubmit(signIn)
    expect(signIn).toHaveBeenCalledWith('lead@kestrel-ridge.example', 'lead-demo-2026')
    expect(wrapper.emitted('signedIn')?.[0]).toEqual([lead])
  })

  it('submits with Enter, because the button is the form’s submit button', () => {
    const wrapper = mount(SignInForm, { props: { signIn: vi.fn() } })
    const button = wrapper.get('[data-testid="signin-submit"]')
    expect(button.attributes('type')).toBe('submit')
    expect(wrapper.get('form').element.contains(button.element)).toBe(true)
  })

  it('shows the server’s message on 401 and clears the password', async () => {
    const wrapper = await fillAndSubmit(async () => {
      throw new ApiError(401, 'invalid_credentials', 'Wrong e-mail address or password.')
    })
    expect(wrapper.get('[data-testid="signin-error"]').text()).toBe('Wrong e-mail address or password.')
    expect((wrapper.get('[data-testid="signin-password"]').element as HTMLInputElement).value).toBe('')
    expect(wrapper.emitted('signedIn')).toBeUndefined()
  })

  it('shows field errors from a 422 next to their fields', async () => {
    const wrapper = await fillAndSubmit(async () => {
      throw new ApiError(422, 'invalid_input', 'Some fields are not valid.', { fields: { email: 'is required', password: 'is required' } })
    })
    const text = wrapper.text()
    expect(text).toContain('E-mail address is required.')
    expect(text).toContain('Password is required.')
    expect(wrapper.find('[data-testid="signin-error"]').exists()).toBe(false)
  })

  it('shows the lock-out message on 429 and the deactivation message on 403', async () => {
    const locked = await fillAndSubmit(async () => {
      throw new ApiError(429, 'too_many_attempts', 'Too many failed sign-in attempts; try again in 15 minutes.')
    })
    expect(locked.get('[data-testid="signin-error"]').text()).toContain('Too many failed sign-in attempts')
    const inactive = await fillAndSubmit(async () => {
      throw new ApiError(403, 'account_inactive', 'This account has been deactivated; ask a lead of your team.')
    })
    expect(inactive.get('[data-testid="signin-error"]').text()).toContain('deactivated')
  })

  it('says the server cannot be reached when the network fails', async () => {
    const wrapper = await fillAndSubmit(async () => {
      throw new ApiError(0, 'network_error', 'Cannot reach the server. Check your connection and try again.')
    })
    expect(wrapper.get('[data-testid="signin-error"]').text()).toMatch(/cannot reach the server/i)
  })
})
