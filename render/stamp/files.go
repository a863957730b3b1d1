package stamp

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/render"
)

// Files stamps the data files a document read (a table's CSV file), each
// as Of stamps the source: its SHA-256 of the bytes read and how those
// bytes relate to git. A file given to the document rather than read
// from the disk (Disk "") has no git facts.
func Files(files []*calcdoc.DataFile) []render.FileStamp { return NewSession().Files(files) }

// Files stamps the data files a document read (see Files), sharing the
// session's repository facts.
func (s *Session) Files(files []*calcdoc.DataFile) []render.FileStamp {
	var out []render.FileStamp
	for _, f := range files {
		if f.Err != "" {
			continue // not read: nothing to trace
		}
		fs := render.FileStamp{Path: f.Path, SHA256: Hash(f.Bytes), State: Unknown, Detail: "the file was not read from the disk; no commit recorded"}
		if f.Disk != "" {
			st := s.Of(f.Disk, f.Bytes)
			fs.Commit, fs.CommitDate, fs.State = st.Commit, st.CommitDate, st.State
			fs.Detail = fileDetail(st.Detail)
		}
		out = append(out, fs)
	}
	return out
}

// fileDetail words a source's Detail for a data file.
func fileDetail(d string) string {
	switch {
	case strings.HasPrefix(d, "source "):
		return "the file " + strings.TrimPrefix(d, "source ")
	case strings.HasPrefix(d, "the source "):
		return "the file's " + strings.TrimPrefix(d, "the source ")
	}
	return d
}
