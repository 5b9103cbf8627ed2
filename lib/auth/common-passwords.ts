// A small, local list of passwords that appear at the top of every published
// breach-frequency list [trade]. Compared case-insensitively after removing
// spaces. Not exhaustive: together with the minimum length and the checks in
// password.ts it turns away the guesses an attacker tries first.
export const COMMON_PASSWORDS: ReadonlySet<string> = new Set([
  "123456", "123456789", "12345678", "1234567890", "12345", "1234567", "password", "password1",
  "password12", "password123", "password1234", "passw0rd", "p@ssw0rd", "p@ssword", "qwerty", "qwerty123",
  "qwertyuiop", "qwerty12345", "1q2w3e4r", "1q2w3e4r5t", "1qaz2wsx", "zaq12wsx", "asdfghjkl", "asdfgh",
  "zxcvbnm", "zxcvbnm123", "abc123", "abcd1234", "abcdef", "abcdefg", "abcdefgh", "abcdefghij",
  "111111", "1111111111", "000000", "0000000000", "123123", "123123123", "121212", "123321",
  "654321", "987654321", "0987654321", "666666", "777777", "888888", "999999", "112233",
  "iloveyou", "iloveyou1", "letmein", "letmein123", "welcome", "welcome1", "welcome123", "monkey",
  "dragon", "football", "baseball", "soccer", "hockey", "basketball", "superman", "batman",
  "princess", "sunshine", "shadow", "master", "master123", "michael", "jennifer", "jordan23",
  "trustno1", "whatever", "starwars", "freedom", "hello123", "helloworld", "charlie", "donald",
  "admin", "admin123", "administrator", "root", "toor", "changeme", "changeme123", "default",
  "secret", "secret123", "login", "login123", "guest", "test", "test123", "testing123",
  "access", "access14", "mustang", "ninja", "pokemon", "liverpool", "chelsea", "arsenal",
  "computer", "internet", "samsung", "google", "michelle", "jessica", "ashley", "daniel",
  "qwe123", "qweasd", "qweasdzxc", "1qazxsw2", "aa123456", "a123456", "a12345678", "q1w2e3r4",
  "q1w2e3r4t5", "q1w2e3r4t5y6", "1234qwer", "qwer1234", "passpass", "pass1234", "mypassword", "yourpassword",
  "newpassword", "mypassword1", "summer2024", "winter2024", "spring2024", "autumn2024", "summer2025", "winter2025",
  "spring2025", "autumn2025", "summer2026", "winter2026", "january2026", "password2024", "password2025", "password2026",
  "lovely", "loveme", "flower", "hunter2", "killer", "cheese", "cookie", "chocolate",
  "butterfly", "purple", "orange", "banana", "pepper", "ginger", "maggie", "buster",
  "tigger", "harley", "hannah", "andrew", "thomas", "robert", "matthew", "joshua",
  "nicole", "daniel1", "anthony", "william", "zxcv1234", "asdf1234", "1234asdf", "asdfasdf",
  "qazwsx", "qazwsxedc", "aaaaaa", "abc12345", "abcabc", "a1b2c3d4", "a1b2c3",
  "rainfall", "raindrop", "rainprint", "rainwater", "isotope", "isotopes", "hydrology", "groundwater",
]);
