// Command gencsv writes a planted n × p CSV for the large-input benchmark:
// a sample id, then p variables from 3 latent factors plus unit noise,
// printed with six significant digits. It is a benchmark tool only.
//
//	go run ./bench/gencsv -n 1000000 -p 20 -o big.csv
package main

import (
	"bufio"
	"flag"
	"fmt"
	"log"
	"math/rand/v2"
	"os"
	"strconv"
)

func main() {
	n := flag.Int("n", 1000000, "rows")
	p := flag.Int("p", 20, "variables")
	out := flag.String("o", "big.csv", "output file")
	seed := flag.Uint64("seed", 1, "random seed")
	flag.Parse()
	rng := rand.New(rand.NewPCG(*seed, 7))
	sd := []float64{3, 2, 1.5}
	load := make([][]float64, *p)
	for j := range load {
		load[j] = make([]float64, len(sd))
		for a := range sd {
			load[j][a] = rng.NormFloat64() * sd[a]
		}
	}
	f, err := os.Create(*out)
	if err != nil {
		log.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	w.WriteString("sample")
	for j := 0; j < *p; j++ {
		fmt.Fprintf(w, ",v%d", j+1)
	}
	w.WriteByte('\n')
	fac := make([]float64, len(sd))
	var buf []byte
	for i := 0; i < *n; i++ {
		for a := range fac {
			fac[a] = rng.NormFloat64()
		}
		buf = append(buf[:0], 's')
		buf = strconv.AppendInt(buf, int64(i+1), 10)
		for j := 0; j < *p; j++ {
			x := rng.NormFloat64()
			for a, l := range load[j] {
				x += l * fac[a]
			}
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, x, 'g', 6, 64)
		}
		buf = append(buf, '\n')
		w.Write(buf)
	}
	if err := w.Flush(); err != nil {
		log.Fatal(err)
	}
	if err := f.Close(); err != nil {
		log.Fatal(err)
	}
}
