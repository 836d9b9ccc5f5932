import bcrypt from "bcryptjs";

// bcrypt cost 10: common practice for interactive sign-in on a small server.
export const hashPassword = (pw: string) => bcrypt.hash(pw, 10);
export const checkPassword = (pw: string, hash: string) => bcrypt.compare(pw, hash);
