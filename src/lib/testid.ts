import type { HTMLAttributes, InputHTMLAttributes } from 'vue'

/** Attributes for the real <input> inside a naive-ui NInput, with a stable data-testid for browser journeys. */
export function inputAttrs(testid: string, attrs: InputHTMLAttributes = {}): InputHTMLAttributes {
  return { ...attrs, ...({ 'data-testid': testid } as InputHTMLAttributes) }
}

/** Row attributes for NDataTable's row-props, which is typed as plain HTMLAttributes. */
export function rowAttrs(data: Record<`data-${string}`, string>, attrs: HTMLAttributes = {}): HTMLAttributes {
  return { ...attrs, ...(data as HTMLAttributes) }
}
