package serve

import (
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/hex"
	"net/http"
	"strconv"
	"strings"
	"sync"
	"time"
)

// auth checks requests against the server's token.
//
// A request is let in with the header "Authorization: Bearer TOKEN", or with
// the session cookie that a one-time sign-in link sets. The cookie holds an
// expiry time and an HMAC-SHA-256 of it keyed by the token, so it is
// worthless without the token and stops working when the token changes.
// Every comparison is constant-time.
type auth struct {
	token []byte

	mu    sync.Mutex
	codes map[string]time.Time // one-time codes and their expiry
	now   func() time.Time
}

// Lifetimes of a sign-in link and of the session it starts.
const (
	LinkLifetime    = 15 * time.Minute
	SessionLifetime = 12 * time.Hour
	cookieName      = "lotproof_session"
	maxCodes        = 64
)

func newAuth(token string) *auth {
	return &auth{token: []byte(token), codes: map[string]time.Time{}, now: time.Now}
}

func (a *auth) allowed(r *http.Request) bool {
	if h := r.Header.Get("Authorization"); h != "" {
		scheme, tok, ok := strings.Cut(h, " ")
		if ok && strings.EqualFold(scheme, "Bearer") {
			return subtle.ConstantTimeCompare([]byte(strings.TrimSpace(tok)), a.token) == 1
		}
		return false
	}
	c, err := r.Cookie(cookieName)
	return err == nil && a.validSession(c.Value)
}

func (a *auth) sign(exp string) string {
	m := hmac.New(sha256.New, a.token)
	m.Write([]byte("lotproof session until " + exp))
	return hex.EncodeToString(m.Sum(nil))
}

func (a *auth) session() (value string, expires time.Time) {
	expires = a.now().Add(SessionLifetime)
	exp := strconv.FormatInt(expires.Unix(), 10)
	return exp + "." + a.sign(exp), expires
}

func (a *auth) validSession(v string) bool {
	exp, mac, ok := strings.Cut(v, ".")
	if !ok {
		return false
	}
	if !hmac.Equal([]byte(mac), []byte(a.sign(exp))) {
		return false
	}
	t, err := strconv.ParseInt(exp, 10, 64)
	return err == nil && a.now().Unix() < t
}

// issue makes a new one-time code.
func (a *auth) issue() string {
	var b [24]byte
	rand.Read(b[:])
	code := hex.EncodeToString(b[:])
	a.mu.Lock()
	defer a.mu.Unlock()
	now := a.now()
	for c, exp := range a.codes {
		if !now.Before(exp) {
			delete(a.codes, c)
		}
	}
	if len(a.codes) >= maxCodes { // drop the oldest
		var oldest string
		for c, exp := range a.codes {
			if oldest == "" || exp.Before(a.codes[oldest]) {
				oldest = c
			}
		}
		delete(a.codes, oldest)
	}
	a.codes[code] = now.Add(LinkLifetime)
	return code
}

// redeem uses up a one-time code: true when it was valid.
func (a *auth) redeem(code string) bool {
	a.mu.Lock()
	defer a.mu.Unlock()
	now := a.now()
	found := ""
	for c := range a.codes { // compare with each, in constant time
		if subtle.ConstantTimeCompare([]byte(c), []byte(code)) == 1 {
			found = c
		}
	}
	if found == "" {
		return false
	}
	exp := a.codes[found]
	delete(a.codes, found)
	return now.Before(exp)
}

// signin redeems a one-time link: it sets the session cookie and sends the
// visitor to the overview.
func (s *Server) signin(w http.ResponseWriter, r *http.Request) {
	if s.auth == nil {
		http.Redirect(w, r, "/", http.StatusSeeOther)
		return
	}
	if !s.auth.redeem(r.PathValue("code")) {
		http.Error(w, "lotproof serve: this sign-in link is unknown, used or expired; ask for a new one", http.StatusUnauthorized)
		return
	}
	v, exp := s.auth.session()
	http.SetCookie(w, &http.Cookie{Name: cookieName, Value: v, Path: "/", Expires: exp, HttpOnly: true,
		SameSite: http.SameSiteStrictMode, Secure: r.TLS != nil})
	http.Redirect(w, r, "/", http.StatusSeeOther)
}

// newLink answers an authenticated POST /signin-links with a new one-time
// sign-in link (text/plain), for handing to a colleague.
func (s *Server) newLink(w http.ResponseWriter, r *http.Request) {
	if s.auth == nil {
		http.Error(w, "lotproof serve: this server has no token, so no sign-in is needed", http.StatusNotFound)
		return
	}
	if r.Header.Get("Authorization") == "" { // a session may not hand out sessions
		http.Error(w, "lotproof serve: new sign-in links need Authorization: Bearer TOKEN", http.StatusForbidden)
		return
	}
	scheme := "http"
	if r.TLS != nil {
		scheme = "https"
	}
	w.Header().Set("Content-Type", "text/plain; charset=utf-8")
	io := scheme + "://" + r.Host
	w.Write([]byte(s.SigninLink(io) + "\n"))
}
