package explorer

import (
	"context"
	"fmt"
	"net/url"
	"slices"
	"testing"
)

// The list's three ways through the same order agree on the demo shops'
// 96 groups: one long page, keyset pages of 7 forwards and backwards, and
// each group's next and previous links and position, for every sort key
// and both directions, with and without a filter.
func TestPagesAndNeighboursAgree(t *testing.T) {
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	b := ts.browser(t)
	b.login("ana", testUsers["ana"])
	b.diagnoseShops()
	s := ts.explorer.sessions.get(sessionRequest(t, b))
	r := s.findRun(1)
	info, err := r.result()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	idsOf := func(p listPage) []string {
		var out []string
		for _, row := range p.Rows {
			out = append(out, row.Href)
		}
		return out
	}
	for _, query := range []string{"", "dir=desc", "sort=score", "sort=score&dir=asc", "sort=kpss_q_value", "sort=mean_p_value&dir=desc",
		"sort=ljung_box_q_value&violation=mean", "cured=no&sort=adf_p_value", "q=lane"} {
		v, _ := url.ParseQuery(query)
		q, err := parseList(v, info)
		if err != nil {
			t.Fatal(err)
		}
		whole := q
		whole.Size = maxPageSize
		all, err := readPage(ctx, s.conn, r, whole)
		if err != nil {
			t.Fatal(err)
		}
		if len(all.Rows) != all.Matching || all.Matching == 0 {
			t.Fatalf("%s: %d rows of %d", query, len(all.Rows), all.Matching)
		}
		// Forwards by keyset.
		var walked []string
		page := q
		page.Size = 7
		var keys []int64
		for {
			p, err := readPage(ctx, s.conn, r, page)
			if err != nil {
				t.Fatal(err)
			}
			walked = append(walked, idsOf(p)...)
			if len(p.Rows) < page.Size {
				break
			}
			keys = append(keys, p.FirstKey)
			last := p.LastKey
			page.After, page.Page = &last, page.Page+1
		}
		if !slices.Equal(walked, idsOf(all)) {
			t.Errorf("%s: keyset pages give %v, one page %v", query, walked, idsOf(all))
		}
		// Backwards from the last full page's first key.
		if len(keys) > 1 {
			back := q
			back.Size = 7
			first := keys[len(keys)-1]
			back.Before = &first
			p, err := readPage(ctx, s.conn, r, back)
			if err != nil {
				t.Fatal(err)
			}
			n := (len(keys) - 2) * 7
			if want := idsOf(all)[n : n+7]; !slices.Equal(idsOf(p), want) {
				t.Errorf("%s: the page before gives %v, want %v", query, idsOf(p), want)
			}
		}
		// Each group's neighbours and position.
		for i, row := range all.Rows {
			id := groupIDOf(t, row.Href)
			for _, after := range []bool{false, true} {
				sqlText, args := q.neighbourSQL(r.table, r.Spec.By, id, after)
				var nb int64
				err := s.conn.QueryRowContext(ctx, sqlText, args...).Scan(&nb)
				want := i + 1
				if !after {
					want = i - 1
				}
				if want < 0 || want >= len(all.Rows) {
					if err == nil {
						t.Errorf("%s: group %d at the end has a neighbour %d", query, id, nb)
					}
					continue
				}
				wantID := groupIDOf(t, all.Rows[want].Href)
				if err != nil || nb != wantID {
					t.Errorf("%s: neighbour (after %v) of %d is %d (%v), want %d", query, after, id, nb, err, wantID)
				}
			}
			posSQL, posArgs := q.positionSQL(r.table, r.Spec.By, id)
			var before, self, total int
			if err := s.conn.QueryRowContext(ctx, posSQL, posArgs...).Scan(&before, &self, &total); err != nil || before != i || self != 1 || total != all.Matching {
				t.Errorf("%s: position of %d: %d %d %d (%v), want %d 1 %d", query, id, before, self, total, err, i, all.Matching)
			}
		}
	}
}

// groupIDOf reads the group id at the end of a group link's path.
func groupIDOf(t *testing.T, href string) int64 {
	u, err := url.Parse(href)
	if err != nil {
		t.Fatal(err)
	}
	var run, id int64
	if _, err := fmt.Sscanf(u.Path, "/runs/%d/groups/%d", &run, &id); err != nil {
		t.Fatalf("%s: %v", href, err)
	}
	return id
}
