import { useToastStore, type ToastInput } from '~/stores/toasts'

type Shortcut = (title: string, message?: string) => number

// `const toast = useToast(); toast.success('Password changed')`
export function useToast() {
  const store = useToastStore()
  const shortcut = (tone: ToastInput['tone']): Shortcut => (title, message) => store.push({ tone, title, message })
  return {
    push: store.push,
    dismiss: store.dismiss,
    success: shortcut('ok'),
    info: shortcut('info'),
    warning: shortcut('warning'),
    error: shortcut('danger'),
  }
}
