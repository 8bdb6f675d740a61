import { mount } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import SetPasswordView from '@/views/SetPasswordView.vue'
import { apiError, flush, jsonResponse, mockFetch } from './helpers'

async function mountAt(path: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/set-password', name: 'setPassword', component: SetPasswordView },
      { path: '/sign-in', name: 'signIn', component: { render: () => null } },
    ],
  })
  await router.push(path)
  const wrapper = mount(SetPasswordView, { global: { plugins: [router] } })
  await flush()
  await flush()
  return wrapper
}

afterEach(() => vi.unstubAllGlobals())

describe('SetPasswordView', () => {
  it('says whom an invitation is for', async () => {
    mockFetch(jsonResponse(200, { purpose: 'invite', email: 'new@kestrel-ridge.example', name: 'Tomas Reyes' }))
    const wrapper = await mountAt('/set-password?token=abcdefghijklmnop')
    expect(wrapper.get('[data-testid="set-password-who"]').text()).toContain('Tomas Reyes')
    expect(wrapper.get('[data-testid="set-password-submit"]').text()).toBe('Set password')
  })

  it('shows a clear expired state when the link is used up', async () => {
    mockFetch(apiError(410, 'link_expired', 'This link has expired or has already been used. Ask for a new one.'))
    const wrapper = await mountAt('/set-password?token=abcdefghijklmnop')
    expect(wrapper.get('[data-testid="set-password-expired"]').text()).toContain('expired or has already been used')
    expect(wrapper.find('[data-testid="set-password-password"]').exists()).toBe(false)
  })

  it('treats a missing token as an unusable link without asking the server', async () => {
    const fetch = mockFetch()
    const wrapper = await mountAt('/set-password')
    expect(wrapper.find('[data-testid="set-password-expired"]').exists()).toBe(true)
    expect(fetch).not.toHaveBeenCalled()
  })
})
