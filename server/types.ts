import type { z } from 'zod';
import type { csrfTokenResponse } from '../shared/api.js';

export type CsrfTokenResponse = z.infer<typeof csrfTokenResponse>;
