import { StatusPage, notFoundText } from '@/components/shell/status-page';

export default function NotFound() {
  return (
    <StatusPage code="404" title="Not found">
      {notFoundText}
    </StatusPage>
  );
}
