package measure
import ("testing";"fmt";"time";"math";"renderchain/chains";"renderchain/render";"renderchain/dsp/spectrum")
func TestX(t *testing.T){
 for _, f := range []string{"/work/main/chains/demo.toml","/work/main/chains/fuzz-only.toml"} {
 ch,err:=chains.Load(f); if err!=nil{t.Fatal(err)}
 eng,err:=render.Prepare(ch,0); if err!=nil{t.Fatal(err)}
 fmt.Println(eng.Circuit.Nodes, eng.Oversample, ch.Source, len(ch.Stages))
 for _, st := range ch.Stages { fmt.Println(st.ID, st.Knobs) }
 c,_:=eng.NewChannel(48000)
 n:=48000/2
 src:=make([]float64,n); dst:=make([]float64,n)
 amp:=0.01/ch.InputPeak
 for i:=range src{src[i]=amp*math.Sin(2*math.Pi*1000*float64(i)/48000)}
 t0:=time.Now()
 got:=0
 for i:=0;i<n;i+=4096{ e:=min(i+4096,n); got+=c.Process(dst[got:], src[i:e])}
 fmt.Println("time",time.Since(t0), got)
 for got < n { k:=c.Flush(dst[got:]); if k==0{break}; got+=k }
 rec:=dst[n-4800:]
 for i:=range rec{rec[i]*=ch.FullScale}
 a,err:=spectrum.Analyze(rec,48000,1000,nil); if err!=nil{t.Fatal(err)}
 fmt.Println(a.DBV, a.THDF, a.DC, a.Method)
 }
}
