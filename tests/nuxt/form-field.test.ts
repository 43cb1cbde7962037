import { describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { h } from 'vue'
import FormField from '~/components/form/FormField.vue'
import FormErrorSummary from '~/components/form/FormErrorSummary.vue'

// The auth plugin asks for the session when the test app starts; nobody is signed in.
registerEndpoint('/api/auth/session', () => ({}))

// The slot receives the control attributes; render a plain input with them, as the pages do.
function mountField(props: Record<string, unknown>) {
  return mountSuspended(FormField, {
    props: { id: 'email', label: 'E-mail', ...props },
    slots: { default: (attrs: Record<string, unknown>) => h('input', attrs) },
  })
}

describe('FormField', () => {
  it('labels the control and leaves it valid when there is no error', async () => {
    const wrapper = await mountField({ hint: 'The address you sign in with.' })
    const input = wrapper.get('input')
    expect(wrapper.get('label').attributes('for')).toBe('email')
    expect(input.attributes('id')).toBe('email')
    expect(input.attributes('aria-invalid')).toBeUndefined()
    expect(input.attributes('aria-describedby')).toBe('email-hint')
    expect(wrapper.find('#email-error').exists()).toBe(false)
  })

  it('shows the error, marks the control invalid and ties both to it', async () => {
    const wrapper = await mountField({ hint: 'The address you sign in with.', error: ['That e-mail address is already taken.'] })
    const input = wrapper.get('input')
    expect(input.attributes('aria-invalid')).toBe('true')
    expect(input.attributes('aria-describedby')?.split(' ')).toEqual(['email-hint', 'email-error'])
    expect(wrapper.get('#email-error').text()).toContain('That e-mail address is already taken.')
  })
})

describe('FormErrorSummary', () => {
  it('links each field error to its field and says a repeated message once', async () => {
    const message = 'An account with a@b.org already exists.'
    const wrapper = await mountSuspended(FormErrorSummary, {
      props: { message, errors: { email: [message] }, labels: { email: 'E-mail' }, prefix: 'signup-' },
    })
    expect(wrapper.attributes('role')).toBe('alert')
    const link = wrapper.get('a')
    expect(link.attributes('href')).toBe('#signup-email')
    expect(link.text()).toBe(`E-mail: ${message}`)
    expect(wrapper.get('p').text()).toBe('Some answers need attention.')
  })

  it('renders nothing when there is nothing to say', async () => {
    const wrapper = await mountSuspended(FormErrorSummary, { props: { message: '', errors: {} } })
    expect(wrapper.find('[role=alert]').exists()).toBe(false)
  })
})
