import { mount } from '@vue/test-utils'
import { describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import AccountPasswordForm from '@/components/AccountPasswordForm.vue'
import { fieldFeedback } from '@/composables/useFormSubmit'
import { flush } from './helpers'

async function submitWith(changePassword: () => Promise<{ message: string }>) {
  const wrapper = mount(AccountPasswordForm, { props: { changePassword } })
  await wrapper.get('[data-testid="account-current-password"]').setValue('old-password-1')
  await wrapper.get('[data-testid="account-new-password"]').setValue('new-password-22')
  await wrapper.get('[data-testid="account-confirm-password"]').setValue('new-password-22')
  await wrapper.get('form').trigger('submit')
  await flush()
  return wrapper
}

describe('AccountPasswordForm', () => {
  it('puts a wrong current password next to that field', async () => {
    const wrapper = await submitWith(async () => {
      throw new ApiError(422, 'invalid_input', 'The current password is not right.', { fields: { currentPassword: 'is not right' } })
    })
    expect(wrapper.text()).toContain('Current password is not right.')
  })

  it('confirms the change and empties the fields', async () => {
    const change = vi.fn(async () => ({ message: 'Your password has been changed.' }))
    const wrapper = await submitWith(change)
    expect(change).toHaveBeenCalledWith('old-password-1', 'new-password-22')
    expect(wrapper.get('[data-testid="account-password-done"]').text()).toBe('Your password has been changed.')
    expect((wrapper.get('[data-testid="account-new-password"]').element as HTMLInputElement).value).toBe('')
  })

  it('does not send two new passwords that differ', async () => {
    const change = vi.fn()
    const wrapper = mount(AccountPasswordForm, { props: { changePassword: change } })
    await wrapper.get('[data-testid="account-current-password"]').setValue('old-password-1')
    await wrapper.get('[data-testid="account-new-password"]').setValue('new-password-22')
    await wrapper.get('[data-testid="account-confirm-password"]').setValue('new-password-23')
    await wrapper.get('form').trigger('submit')
    expect(change).not.toHaveBeenCalled()
    expect(wrapper.text()).toContain('The two new passwords differ.')
  })
})

describe('fieldFeedback', () => {
  it('puts the field label before the server’s message as a sentence', () => {
    expect(fieldFeedback('New password', 'must be at least 10 characters')).toBe('New password must be at least 10 characters.')
  })

  it('avoids repeating the label when the message already names it', () => {
    expect(fieldFeedback('E-mail address', 'is not an e-mail address')).toBe('This is not an e-mail address.')
  })

  it('says nothing when there is no message', () => {
    expect(fieldFeedback('Name', undefined)).toBeUndefined()
    // An instruction is a sentence of its own, never "This choose a campaign."
    expect(fieldFeedback('Campaign', 'choose a campaign')).toBe('Choose a campaign.')
  })
})
