# Independent reproduction, in Python with exact 64-bit integers, of the value pinned in
# test/uncertainty/posterior.test.ts ("pins seeded values"): posteriorDraws of counts [[3, 1], [2, 5]]
# under the Jeffreys prior (Dirichlet(3.5, 1.5) and Dirichlet(2.5, 5.5) rows), 2 draws, seed 42, root
# stream. Written from the published algorithms, not from sere's code: stream key = SHA-256 of
# "sere-random:<seed>:<name>" read as four little-endian 64-bit words -> xoshiro256** (Blackman &
# Vigna 2021; uniform = (x >> 11) * 2**-53) -> ziggurat normals (Marsaglia & Tsang 2000, 256 strips,
# R = 3.6541528853610088, V = 0.00492867323399; one uniform u: b = floor(512u) gives strip b >> 1 and
# sign b & 1, 512u - b the point along the strip; Marsaglia's 1964 tail) -> gamma (Marsaglia & Tsang 2000; boost U**(1/a) below shape 1) -> normalised rows.
# Run: python3 test/reference/seeded-posterior.py
import hashlib, math
M=(1<<64)-1
R=3.6541528853610088; V=0.00492867323399
f=lambda x: math.exp(-0.5*x*x)
X=[V/f(R),R]
for i in range(1,255): X.append(math.sqrt(-2*math.log(V/X[i]+f(X[i]))))
X.append(0.0)
F=[f(x) for x in X]
def rotl(x,k): return ((x<<k)|(x>>(64-k)))&M
class Stream:
    def __init__(self, seed, name):
        d=hashlib.sha256(f'sere-random:{seed}:{name}'.encode()).digest()
        self.s=[int.from_bytes(d[8*j:8*j+8],'little') for j in range(4)]
    def uniform(self):
        s=self.s
        r=(rotl((s[1]*5)&M,7)*9)&M
        t=(s[1]<<17)&M
        s[2]^=s[0]; s[3]^=s[1]; s[1]^=s[2]; s[0]^=s[3]; s[2]^=t; s[3]=rotl(s[3],45)
        return (r>>11)*2**-53
    def normal(self):
        while True:
            v=self.uniform()*512; b=int(v); i=b>>1; u=v-b; z=u*X[i]
            if u<X[i+1]/X[i]: return -z if b&1 else z
            if i==0:
                while True:
                    a=-math.log(1-self.uniform())/R; e=-math.log(1-self.uniform())
                    if not e+e<a*a: break
                return -(R+a) if b&1 else R+a
            if F[i]+self.uniform()*(F[i+1]-F[i])<math.exp(-0.5*z*z): return -z if b&1 else z
    def gamma1(self,a):
        d=a-1/3; c=1/math.sqrt(9*d)
        while True:
            while True:
                x=self.normal(); v=1+c*x
                if v>0: break
            v=v*v*v; u=self.uniform(); x2=x*x
            if u<1-0.0331*x2*x2: return d*v
            if math.log(u)<0.5*x2+d*(1-v+math.log(v)): return d*v
    def gamma(self,a):
        return self.gamma1(a) if a>=1 else self.gamma1(a+1)*self.uniform()**(1/a)
r=Stream(42,'')
alpha=[[3.5,1.5],[2.5,5.5]]
out=[]
for d in range(2):
    for row in alpha:
        g=[r.gamma(a) for a in row]; t=sum(g); out+=[f'{x/t:.12f}' for x in g]
print(out)
