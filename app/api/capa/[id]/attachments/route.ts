import { evidenceRoutes } from '@/lib/attachments/http';

/* GET and POST /api/capa/:id/attachments: the capa's evidence files (lib/attachments/http.ts evidenceRoutes). */

export const { GET, POST } = evidenceRoutes('capa');
