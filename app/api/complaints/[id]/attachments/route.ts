import { evidenceRoutes } from '@/lib/attachments/http';

/* GET and POST /api/complaints/:id/attachments: the complaint's evidence files (lib/attachments/http.ts evidenceRoutes). */

export const { GET, POST } = evidenceRoutes('complaint');
