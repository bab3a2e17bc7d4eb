import { StatusPage, forbiddenText } from '@/components/shell/status-page';

export default function Forbidden() {
  return (
    <StatusPage code="403" title="Not available to your role">
      {forbiddenText}
    </StatusPage>
  );
}
