import type { Role } from '../../lib/auth/roles';

/*
 * The demo sign-ins, as listed in DEVELOPERS.md ("Demo sign-ins"). Browser tests sign in with these,
 * so a change here is a change to that table too.
 */

export interface DemoUser {
  email: string;
  name: string;
  /** Printed under the name on electronic signatures. */
  title: string;
  role: Role;
}

export const demoPassword = 'capsule-demo-2026';

export const demoUsers: readonly DemoUser[] = [
  {
    email: 'operator@brackwater.example',
    name: 'Tova Lindqvist-Amaro',
    title: 'Capsule Filling Operator',
    role: 'operator',
  },
  {
    email: 'operator2@brackwater.example',
    name: 'Ruben Okafor-Hale',
    title: 'Capsule Filling Operator',
    role: 'operator',
  },
  {
    email: 'supervisor@brackwater.example',
    name: 'Marguerite Osei-Brandt',
    title: 'Encapsulation Supervisor',
    role: 'supervisor',
  },
  {
    email: 'investigator@brackwater.example',
    name: 'Idris Vantongeren',
    title: 'QA Investigator',
    role: 'qa_investigator',
  },
  {
    email: 'investigator2@brackwater.example',
    name: 'Saoirse Delacroix-Muna',
    title: 'QA Investigator',
    role: 'qa_investigator',
  },
  {
    email: 'approver@brackwater.example',
    name: 'Henrike Mbeki-Strand',
    title: 'Head of Quality Assurance',
    role: 'qa_approver',
  },
  {
    email: 'admin@brackwater.example',
    name: 'Callum Aurelio-Ferris',
    title: 'Quality Systems Administrator',
    role: 'admin',
  },
];
