import { useSubmit } from './use-submit';

/** One-argument form of useSubmit for the billing and people screens: busy, the API error, revalidation. */
export function useMutation<A, R>(run: (arg: A) => Promise<R>, revalidates: readonly string[]) {
  const { submit, error, isBusy, clearError } = useSubmit(run, [...revalidates]);
  return { submit: (arg: A) => submit(arg), error, isSubmitting: isBusy, reset: clearError };
}
