/** String sizing: one mutation against POST /api/strings/size. */
import { useMutation } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { stringKeys } from '@/lib/api/keys';
import type { StringSizeRequest, StringSizeResponse } from '@/lib/schemas/strings';

export { stringKeys };

/** Sizes a string from a batch, one curve or typed values (parsed by stringSizeSchema first). */
export function useSizeString() {
  return useMutation({
    mutationKey: stringKeys.size(),
    mutationFn: (input: StringSizeRequest) => apiFetch<StringSizeResponse>('/api/strings/size', { body: input as Record<string, unknown> }),
  });
}
