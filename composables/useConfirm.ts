export interface ConfirmOptions {
  title: string
  message?: string
  confirmLabel?: string
  cancelLabel?: string
  // "danger" for what cannot be undone: red confirm button, and focus starts on Cancel.
  tone?: 'primary' | 'danger'
}

export interface ConfirmRequest extends ConfirmOptions {
  id: number
  resolve: (confirmed: boolean) => void
}

/**
 * Ask a yes/no question in the app-wide dialog (BaseConfirmDialog, mounted in app.vue):
 *
 *   const { confirm } = useConfirm()
 *   if (await confirm({ title: 'Exclude this run?', tone: 'danger', confirmLabel: 'Exclude' })) …
 *
 * The promise resolves `true` on confirm and `false` on cancel, Esc or a newer question; it
 * never rejects, so callers need no try/catch for an ordinary "no".
 */
export function useConfirm() {
  // Per-app state (not a module-level ref) so two server requests never share a dialog.
  // It is only ever filled in the browser, so the resolver never reaches the SSR payload.
  const pending = useState<ConfirmRequest | null>('halocline-confirm', () => null)

  function answer(confirmed: boolean) {
    const request = pending.value
    if (!request) return
    pending.value = null
    request.resolve(confirmed)
  }

  function confirm(options: ConfirmOptions): Promise<boolean> {
    answer(false)
    return new Promise<boolean>((resolve) => {
      pending.value = { ...options, id: Date.now(), resolve }
    })
  }

  return { confirm, answer, pending: readonly(pending) }
}
