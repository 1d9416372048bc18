// Placeholder: the server foundation replaces this with the private MariaDB start for API tests.
export default async function setup(): Promise<void> {}
