import { evidenceRoutes } from '@/lib/attachments/http';

/* GET and POST /api/deviations/:id/attachments: the deviation's evidence files (lib/attachments/http.ts evidenceRoutes). */

export const { GET, POST } = evidenceRoutes('deviation');
